import type { Axis } from "../../logs/columns";
import { axisValues } from "../axis-values";
import { mulberry32, type Random } from "../random";
import type { TelemetrySpec } from "./telemetry";

/**
 * The simulated fleet: one invented 5-inch-class X design, several airframes built to it. Every
 * number here was made up for the simulator; they only need to behave like a quad and its flight
 * controller (frame modes at 100–500 Hz, motor orders that sweep with throttle, gyro low-passes at
 * 100–300 Hz and notches on each motor's rotation: common practice).
 */

export interface ModeSpec {
  name: string;
  naturalHz: number;
  dampingRatio: number;
  /** Mode shape as seen by the gyro: how strongly the mode shows on each axis (0..1). */
  shape: Record<Axis, number>;
  /** Peak amplification of the modal excitation. */
  gain: number;
  /** A primary mode may be cracked by the damage model (the ones below 360 Hz, visible in every log rate). */
  primary: boolean;
}

export interface MotorSpec {
  motor: number;
  /** How the motor's vibration reaches each gyro axis. */
  coupling: Record<Axis, number>;
  /** Mixer signs: how the motor's throttle moves for a roll, pitch or yaw demand. */
  mix: Record<Axis, number>;
  /** Speed factor of this motor (winding and magnet spread), ~1. */
  kvFactor: number;
  /** Order amplitudes at full rpm, deg/s equivalent of rate at the gyro before any filtering. */
  order1: number;
  order2: number;
  bladePass: number;
  order4: number;
  /** Healthy bearing: broadband noise level and its defect tones. */
  bearingNoise: number;
  bearingTone: number;
  /** Looseness: half orders (0.5×, 1.5×, 2.5×) and amplitude modulation of 1× and 2× (depth 0..1, rate Hz). */
  halfOrders: number;
  amDepth: number;
  amHz: number;
}

/** The flight controller's gyro filtering (run at the loop rate, before logging). */
export interface FcFilterSpec {
  loopRateHz: number;
  /** First low-pass: one-pole, corner Hz. */
  lowPass1Hz: number;
  /** Second low-pass: Butterworth biquad, corner Hz; null when the airframe runs without it. */
  lowPass2Hz: number | null;
  /** Harmonics of each motor's rotation that get a notch (1 = 1×). */
  notchHarmonics: number[];
  notchQ: number;
  /** Notches never go below this centre, Hz. */
  notchMinHz: number;
  /**
   * The controller's own estimate of each motor's speed, which the notches follow: the true speed
   * delayS late, off by a steady relative bias of up to ±errorFraction per motor and a slow wander
   * of half that size. A
   * perfect estimate would notch a tone away entirely; a real one leaves a residual that grows
   * with the tone.
   */
  rpmEstimate: { delayS: number; errorFraction: number };
}

/** How this airframe's logger writes its files. */
export type HeaderStyle = "canonical" | "foreign-a" | "foreign-b";

export interface SimAirframe {
  id: number;
  name: string;
  modes: ModeSpec[];
  motors: MotorSpec[];
  blades: number;
  /** rev/min at full throttle and full battery, and at zero throttle (armed idle). */
  maxRpm: number;
  idleRpm: number;
  /** Motor speed time constant, s. */
  motorTauS: number;
  /** Bearing defect orders: outer race (BPFO) and inner race (BPFI) in multiples of rotation. */
  bearingOrders: [number, number];
  /** Broadband airflow excitation at full throttle, deg/s rms (at 4 kHz sampling). */
  airflow: number;
  /** Gyro sensor: white noise density (deg/s)/√Hz, full scale ±deg/s, bits. */
  sensor: { noiseDensity: number; rangeDegS: number; bits: number };
  fc: FcFilterSpec;
  telemetry: Omit<TelemetrySpec, "dropouts">;
  headerStyle: HeaderStyle;
  /** Hover throttle with a full battery. */
  hoverThrottle: number;
}

/**
 * Bearing defect frequencies as multiples of shaft speed, from the standard rolling-bearing
 * kinematics: BPFO = (n/2)(1 − ρ), BPFI = (n/2)(1 + ρ), ρ = (d/D)·cos φ (ball and pitch diameters,
 * contact angle). The design's bearing (n = 7, ρ = 0.31) is invented; the formulas are textbook
 * (e.g. Harris, Rolling Bearing Analysis; from memory).
 */
export function bearingDefectOrders(balls: number, rho: number): [number, number] {
  return [(balls / 2) * (1 - rho), (balls / 2) * (1 + rho)];
}

/**
 * The design's modes: name, natural frequency Hz, damping ratio, shape (roll, pitch, yaw), gain,
 * primary.
 */
const DESIGN_MODE_ROWS: [string, number, number, Record<Axis, number>, number, boolean][] = [
  ["roll bending", 168, 0.03, axisValues(1, 0.15, 0.05), 5, true],
  ["pitch bending", 224, 0.028, axisValues(0.1, 1, 0.05), 6, true],
  ["arm torsion", 296, 0.035, axisValues(0.08, 0.1, 1), 4, true],
  ["diagonal bending", 352, 0.04, axisValues(0.65, 0.6, 0.1), 3, true],
  ["second bending", 438, 0.045, axisValues(0.7, 0.5, 0.15), 2.5, false],
  ["second torsion", 612, 0.05, axisValues(0.1, 0.1, 0.8), 2, false],
];

const DESIGN_MODES: ModeSpec[] = DESIGN_MODE_ROWS.map(
  ([name, naturalHz, dampingRatio, shape, gain, primary]) => ({
    name,
    naturalHz,
    dampingRatio,
    shape,
    gain,
    primary,
  }),
);

/** The design's motors: number, coupling (roll, pitch, yaw), mixer signs, 1× amplitude. */
const DESIGN_MOTOR_ROWS: [number, Record<Axis, number>, Record<Axis, number>, number][] = [
  [1, axisValues(0.72, 0.68, 0.3), axisValues(-1, 1, -1), 2.4],
  [2, axisValues(0.66, 0.74, 0.28), axisValues(-1, -1, 1), 2.8],
  [3, axisValues(0.7, 0.7, 0.32), axisValues(1, 1, 1), 2.2],
  [4, axisValues(0.75, 0.65, 0.3), axisValues(1, -1, -1), 2.6],
];

/** What every motor of the design shares: its other orders, a healthy bearing, no looseness. */
const DESIGN_MOTOR_COMMON = {
  order2: 1.0,
  bladePass: 1.6,
  order4: 0.3,
  bearingNoise: 0.6,
  bearingTone: 0.12,
  halfOrders: 0,
  amDepth: 0,
  amHz: 0,
};

const DESIGN_MOTORS: Omit<MotorSpec, "kvFactor">[] = DESIGN_MOTOR_ROWS.map(
  ([motor, coupling, mix, order1]) => ({ motor, coupling, mix, order1, ...DESIGN_MOTOR_COMMON }),
);

const HEADER_STYLES: HeaderStyle[] = ["canonical", "foreign-a", "foreign-b"];

function between(rand: Random, lo: number, hi: number): number {
  return lo + (hi - lo) * rand();
}

/**
 * Airframe number `id` of the fleet: the design with this airframe's own spread (modes ±2 % in
 * frequency and ±10 % in damping, motor balance ±20 %, motor speed ±1.5 %) and its own set-up of
 * flight-controller filters, ESC telemetry and logger. The same id always gives the same airframe.
 */
export function fleetAirframe(id: number): SimAirframe {
  const r = mulberry32(0xa1f0 + 7919 * id);
  const modes = DESIGN_MODES.map((m) => ({
    ...m,
    shape: { ...m.shape },
    naturalHz: m.naturalHz * (1 + 0.04 * (r() - 0.5)),
    dampingRatio: m.dampingRatio * (1 + 0.2 * (r() - 0.5)),
  }));
  const motors = DESIGN_MOTORS.map((m) => ({
    ...m,
    coupling: { ...m.coupling },
    mix: { ...m.mix },
    kvFactor: 1 + 0.03 * (r() - 0.5),
    order1: m.order1 * between(r, 0.8, 1.25),
  }));
  // Notches on 1× and, on some airframes, blade pass (3×). The four motors' 1× notches overlap
  // (the motors spin within a few per cent of each other), so together they take a 1× tone away
  // almost entirely; 2× is left to the low-passes, so a bent prop's 2× stays in the log.
  const harmonicsChoice: number[][] = [[1], [1, 3]];
  const stepChoice = [10, 20, 50, 100];
  const fc: FcFilterSpec = {
    loopRateHz: 8000,
    lowPass1Hz: Math.round(between(r, 150, 250)),
    lowPass2Hz: r() < 0.7 ? Math.round(between(r, 200, 320)) : null,
    notchHarmonics: harmonicsChoice[Math.floor(r() * harmonicsChoice.length)] ?? [1],
    notchQ: between(r, 3, 6),
    notchMinHz: 80,
    rpmEstimate: { delayS: between(r, 0.0005, 0.002), errorFraction: between(r, 0.002, 0.006) },
  };
  return {
    id,
    name: `FS-${String(id).padStart(2, "0")}`,
    modes,
    motors,
    blades: 3,
    maxRpm: 28000,
    idleRpm: 3000,
    motorTauS: between(r, 0.02, 0.035),
    bearingOrders: bearingDefectOrders(7, 0.31),
    airflow: 7,
    // 0.007 (deg/s)/√Hz is a typical MEMS gyro noise density (datasheet order of magnitude, from memory).
    sensor: { noiseDensity: 0.007, rangeDegS: 2000, bits: 16 },
    fc,
    telemetry: {
      updateHz: Math.round(between(r, 200, 500)),
      delayS: between(r, 0.01, 0.05),
      stepRpm: stepChoice[Math.floor(r() * stepChoice.length)] ?? 50,
      noiseFraction: between(r, 0.002, 0.01),
    },
    headerStyle: HEADER_STYLES[(id - 1) % HEADER_STYLES.length] ?? "canonical",
    hoverThrottle: between(r, 0.26, 0.32),
  };
}

/** A deep copy, so damage can change it without touching the healthy airframe. */
export function cloneAirframe(a: SimAirframe): SimAirframe {
  return {
    ...a,
    modes: a.modes.map((m) => ({ ...m, shape: { ...m.shape } })),
    motors: a.motors.map((m) => ({ ...m, coupling: { ...m.coupling }, mix: { ...m.mix } })),
    fc: { ...a.fc, notchHarmonics: [...a.fc.notchHarmonics], rpmEstimate: { ...a.fc.rpmEstimate } },
    telemetry: { ...a.telemetry },
    sensor: { ...a.sensor },
    bearingOrders: [a.bearingOrders[0], a.bearingOrders[1]],
  };
}
