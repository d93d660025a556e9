import { AXES, type Axis } from "../../logs/columns";
import { mulberry32, type Random } from "../random";
import { cloneAirframe, type ModeSpec, type SimAirframe } from "./airframe";

/**
 * Damage classes of the simulator, each at severities 1 (mild) to 3 (severe), and the truth of
 * each case: which class, on which axes, at which frequencies, on which motor. The signatures are
 * the ones the trade looks for (common practice): a crack lowers one mode and damps it; loose frame
 * screws lower and broaden every mode; a bent or chipped prop raises its motor's 1× (and some 2×);
 * loose motor screws raise 1× and 2× with half orders and sidebands; a worn bearing raises the
 * broadband noise and its motor's bearing-defect orders; a loose stack or a loose camera or antenna
 * adds a resonance of its own. The magnitudes are invented.
 */

export const DAMAGE_CLASSES = [
  "crack",
  "loose-frame",
  "bent-prop",
  "loose-motor",
  "bearing",
  "loose-stack",
  "loose-mount",
] as const;
export type DamageClass = (typeof DAMAGE_CLASSES)[number];
export type Severity = 1 | 2 | 3;

export interface DamageSpec {
  kind: DamageClass;
  severity: Severity;
  /** Chooses where the damage is (which mode, motor, axis, frequency); the same seed at another severity puts it in the same place. */
  seed: number;
}

/** What a case really has, to hold the assessment against. */
export interface CaseTruth {
  kind: DamageClass | "healthy";
  severity: 0 | Severity;
  description: string;
  /** Axes the damage shows on (empty: not an axis-specific damage). */
  axes: Axis[];
  /** Frequencies that locate the damage, Hz (empty: not a fixed frequency, e.g. a motor order). */
  freqsHz: number[];
  /** The damaged motor, when the damage is on one. */
  motor?: number;
}

/** Per severity 1, 2, 3. */
export const CRACK_DROP = [0.04, 0.08, 0.14] as const;
export const CRACK_DAMPING = [1.3, 1.7, 2.4] as const;
export const LOOSE_FRAME_DROP = [0.03, 0.06, 0.1] as const;
export const LOOSE_FRAME_DAMPING = [1.5, 2.2, 3.2] as const;
export const PROP_1X = [2, 4, 8] as const;
export const PROP_2X = [1.5, 3, 6] as const;
export const LOOSE_MOTOR_1X = [1.5, 2.2, 3.5] as const;
export const LOOSE_MOTOR_2X = [2, 3.5, 6] as const;
export const LOOSE_MOTOR_HALF = [0.3, 0.6, 1.2] as const;
export const LOOSE_MOTOR_AM = [0.2, 0.35, 0.5] as const;
export const BEARING_NOISE = [4, 10, 25] as const;
export const BEARING_TONE = [4, 8, 16] as const;
export const STACK_GAIN = [1, 2, 4] as const;
export const MOUNT_GAIN = [0.5, 1, 2] as const;

/** Frequency windows for a new resonance that keep it at least 7 % from the design's modes. */
const STACK_WINDOWS: readonly (readonly [number, number])[] = [
  [140, 154],
  [182, 205],
  [243, 272],
];
const MOUNT_WINDOW = [55, 120] as const;

function pick<T>(rand: Random, items: readonly T[]): T {
  const v = items[Math.floor(rand() * items.length)];
  if (v === undefined) throw new RangeError("pick from an empty list");
  return v;
}

function mainAxes(shape: Record<Axis, number>): Axis[] {
  const max = Math.max(...AXES.map((a) => shape[a]));
  return AXES.filter((a) => shape[a] >= 0.5 * max);
}

/** A loose part's own resonance, added to the frame's modes (never one a crack may take). */
function rockingMode(
  name: string,
  naturalHz: number,
  dampingRatio: number,
  shape: Record<Axis, number>,
  gain: number,
): ModeSpec {
  return { name, naturalHz, dampingRatio, shape, gain, primary: false };
}

function healthyTruth(): CaseTruth {
  return { kind: "healthy", severity: 0, description: "no damage", axes: [], freqsHz: [] };
}

/** The airframe with the damage applied (a copy) and the truth of the case. */
export function applyDamage(
  airframe: SimAirframe,
  damage: DamageSpec | null,
): { airframe: SimAirframe; truth: CaseTruth } {
  const a = cloneAirframe(airframe);
  const where = damage ? damageTo(a, damage) : null;
  // The kind and severity are the spec's; where the damage went and how it shows, the case's own.
  return {
    airframe: a,
    truth:
      damage && where ? { kind: damage.kind, severity: damage.severity, ...where } : healthyTruth(),
  };
}

type DamageWhere = Omit<CaseTruth, "kind" | "severity">;

function onMotor(description: string, motor: number): DamageWhere {
  return { description, axes: [], freqsHz: [], motor };
}

/** Applies the damage to `a` in place; null when there is nothing to damage (no motor). */
function damageTo(a: SimAirframe, damage: DamageSpec): DamageWhere | null {
  const s = damage.severity - 1;
  const rand = mulberry32(0xd00d + 104729 * damage.seed);
  const motorIndex = Math.floor(rand() * a.motors.length);
  const motor = a.motors[motorIndex];
  switch (damage.kind) {
    case "crack": {
      const candidates = a.modes.filter((m) => m.primary);
      const mode = pick(rand, candidates);
      const drop = CRACK_DROP[s] ?? 0.08;
      const damping = CRACK_DAMPING[s] ?? 1.7;
      const axes = mainAxes(mode.shape);
      // A crack in one arm of a mode that shows on two axes may split it: the cracked side drops
      // and the other side keeps the old frequency.
      const oneSide = axes.length > 1 && rand() < 0.5 ? pick(rand, axes) : null;
      let cracked: ModeSpec = mode;
      if (oneSide) {
        cracked = {
          ...mode,
          name: `${mode.name} (cracked side)`,
          shape: { roll: 0, pitch: 0, yaw: 0 },
        };
        cracked.shape[oneSide] = mode.shape[oneSide];
        mode.shape[oneSide] = 0.1 * mode.shape[oneSide];
        a.modes.push(cracked);
      }
      cracked.naturalHz *= 1 - drop;
      cracked.dampingRatio *= damping;
      return {
        description: `crack: ${mode.name} ${Math.round(drop * 100)} % lower${oneSide ? ` on ${oneSide} only` : ""}, damping ×${damping}`,
        axes: oneSide ? [oneSide] : axes,
        freqsHz: [cracked.naturalHz],
      };
    }
    case "loose-frame": {
      const drop = LOOSE_FRAME_DROP[s] ?? 0.06;
      const damping = LOOSE_FRAME_DAMPING[s] ?? 2.2;
      for (const m of a.modes) {
        m.naturalHz *= 1 - drop;
        m.dampingRatio *= damping;
      }
      const primary = a.modes.filter((m) => m.primary);
      return {
        description: `loose frame screws: every mode ${Math.round(drop * 100)} % lower, damping ×${damping}`,
        axes: [...AXES],
        freqsHz: primary.map((m) => m.naturalHz),
      };
    }
    case "bent-prop": {
      if (!motor) break;
      motor.order1 *= PROP_1X[s] ?? 4;
      motor.order2 *= PROP_2X[s] ?? 1.7;
      return onMotor(
        `bent prop on motor ${motor.motor}: 1× ×${PROP_1X[s]}, 2× ×${PROP_2X[s]}`,
        motor.motor,
      );
    }
    case "loose-motor": {
      if (!motor) break;
      motor.order1 *= LOOSE_MOTOR_1X[s] ?? 2.2;
      motor.order2 *= LOOSE_MOTOR_2X[s] ?? 3.5;
      motor.halfOrders = (LOOSE_MOTOR_HALF[s] ?? 0.6) * motor.order2;
      motor.amDepth = LOOSE_MOTOR_AM[s] ?? 0.35;
      motor.amHz = 6 + 10 * rand();
      return onMotor(
        `loose screws on motor ${motor.motor}: 1× ×${LOOSE_MOTOR_1X[s]}, 2× ×${LOOSE_MOTOR_2X[s]}, half orders and ${motor.amHz.toFixed(1)} Hz sidebands`,
        motor.motor,
      );
    }
    case "bearing": {
      if (!motor) break;
      motor.bearingNoise *= BEARING_NOISE[s] ?? 6;
      motor.bearingTone *= BEARING_TONE[s] ?? 8;
      return onMotor(
        `worn bearing on motor ${motor.motor}: broadband ×${BEARING_NOISE[s]}, defect orders ${a.bearingOrders.map((o) => o.toFixed(2)).join("× and ")}× ×${BEARING_TONE[s]}`,
        motor.motor,
      );
    }
    case "loose-stack": {
      const [lo, hi] = pick(rand, STACK_WINDOWS);
      const freq = lo + (hi - lo) * rand();
      const axis: Axis = rand() < 0.5 ? "roll" : "pitch";
      const shape = { roll: 0.5, pitch: 0.5, yaw: 0.08 };
      shape[axis] = 1;
      a.modes.push(rockingMode("stack rocking", freq, 0.05, shape, STACK_GAIN[s] ?? 2.5));
      return {
        description: `loose flight-controller stack: new resonance at ${freq.toFixed(0)} Hz, mostly ${axis}`,
        axes: [axis],
        freqsHz: [freq],
      };
    }
    case "loose-mount": {
      const freq = MOUNT_WINDOW[0] + (MOUNT_WINDOW[1] - MOUNT_WINDOW[0]) * rand();
      const axis: Axis = rand() < 0.5 ? "pitch" : "yaw";
      const shape = { roll: 0.2, pitch: 0.2, yaw: 0.2 };
      shape[axis] = 1;
      const what = rand() < 0.5 ? "camera" : "antenna";
      a.modes.push(rockingMode(`${what} rocking`, freq, 0.07, shape, MOUNT_GAIN[s] ?? 3));
      return {
        description: `loose ${what}: new resonance at ${freq.toFixed(0)} Hz, mostly ${axis}`,
        axes: [axis],
        freqsHz: [freq],
      };
    }
  }
  return null;
}
