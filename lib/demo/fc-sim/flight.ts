import { mulberry32, type Random } from "../random";

/**
 * What the pilot flies: a schedule of phases. Hover; cruise with turns; punch-outs to near full
 * throttle; prop-wash descents (low throttle through the quad's own wake: a broadband skirt at low
 * frequency); flips and rolls (large rates at low throttle, then a catch). Which phases and how
 * often is the flight's mix; each test log flies another mix than the baseline logs.
 */

export const PHASE_KINDS = ["hover", "cruise", "punch", "wash", "flip", "roll"] as const;
export type PhaseKind = (typeof PHASE_KINDS)[number];

export const FLIGHT_MIXES = ["baseline", "race", "freestyle", "hard", "wash-heavy"] as const;
export type FlightMix = (typeof FLIGHT_MIXES)[number];

/** Share of phases of each kind in a mix. */
export const MIX_WEIGHTS: Record<FlightMix, Record<PhaseKind, number>> = {
  baseline: { hover: 0.3, cruise: 0.4, punch: 0.12, wash: 0.08, flip: 0.05, roll: 0.05 },
  race: { hover: 0.08, cruise: 0.52, punch: 0.25, wash: 0.05, flip: 0.05, roll: 0.05 },
  freestyle: { hover: 0.1, cruise: 0.3, punch: 0.2, wash: 0.15, flip: 0.13, roll: 0.12 },
  hard: { hover: 0.05, cruise: 0.3, punch: 0.3, wash: 0.15, flip: 0.1, roll: 0.1 },
  "wash-heavy": { hover: 0.25, cruise: 0.25, punch: 0.1, wash: 0.3, flip: 0.05, roll: 0.05 },
};

export interface Phase {
  kind: PhaseKind;
  startS: number;
  durationS: number;
  /** Throttle the pilot holds (before battery compensation for hover). */
  throttle: number;
  /** Turn or flip rate targets, deg/s. */
  rollRate: number;
  pitchRate: number;
  yawRate: number;
}

function between(rand: Random, lo: number, hi: number): number {
  return lo + (hi - lo) * rand();
}

function choose(rand: Random, weights: Record<PhaseKind, number>): PhaseKind {
  const total = PHASE_KINDS.reduce((s, k) => s + weights[k], 0);
  let x = rand() * total;
  for (const k of PHASE_KINDS) {
    x -= weights[k];
    if (x < 0) return k;
  }
  return "cruise";
}

/**
 * A schedule of phases covering durationS. Starts with a short hover (take-off) as flights do;
 * flips and rolls are followed by a catch at high throttle.
 */
export function flightSchedule(
  mix: FlightMix,
  durationS: number,
  seed: number,
  hoverThrottle: number,
): Phase[] {
  const rand = mulberry32(0xf11e + 15485863 * seed);
  const phases: Phase[] = [];
  let t = 0;
  const push = (
    kind: PhaseKind,
    durationS: number,
    throttle: number,
    rates: [number, number, number] = [0, 0, 0],
  ) => {
    phases.push({
      kind,
      startS: t,
      durationS,
      throttle,
      rollRate: rates[0],
      pitchRate: rates[1],
      yawRate: rates[2],
    });
    t += durationS;
  };
  push("hover", 1.5, hoverThrottle);
  while (t < durationS) {
    const kind = choose(rand, MIX_WEIGHTS[mix]);
    const sign = rand() < 0.5 ? -1 : 1;
    switch (kind) {
      case "hover":
        push("hover", between(rand, 1.5, 4), hoverThrottle);
        break;
      case "cruise":
        push("cruise", between(rand, 1, 3), between(rand, 0.38, 0.62), [
          sign * between(rand, 50, 250),
          between(rand, -80, 80),
          sign * between(rand, 40, 200),
        ]);
        break;
      case "punch":
        push("punch", between(rand, 0.6, 1.5), between(rand, 0.82, 1));
        break;
      case "wash":
        push("wash", between(rand, 0.8, 2), between(rand, 0.08, 0.2), [
          between(rand, -60, 60),
          between(rand, -60, 60),
          0,
        ]);
        break;
      case "flip":
      case "roll": {
        // One turn (360°) in about 0.4 s: a mean rate near 900 deg/s, peaks higher.
        const d = between(rand, 0.35, 0.5);
        const rate = (sign * 360) / d;
        push(kind, d, between(rand, 0.05, 0.15), kind === "roll" ? [rate, 0, 0] : [0, rate, 0]);
        push("punch", between(rand, 0.4, 0.8), between(rand, 0.65, 0.85));
        break;
      }
    }
  }
  return phases;
}
