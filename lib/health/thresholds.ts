/**
 * Thresholds of the health score, in one place.
 *
 * They follow condition-monitoring practice: judge a machine by the change from its own baseline
 * (ISO 20816-1 criterion II; ISO 17359 allows alarms from the machine's own baseline), with an alert
 * around twice the baseline amplitude (+6 dB) and danger around four times (+12 dB) (common practice
 * in machinery monitoring: alert 2–3×, alarm 4–6×, danger 8–10×). Our "watch" step at +3 dB
 * (1.4× amplitude) sits above ISO's 25 %-of-boundary change (+1.9 dB), because flight logs scatter
 * more than a machine measured in a fixed state. Mode shifts: a drop of 3 / 6 / 12 % means about
 * 6 / 12 / 23 % less stiffness (f ∝ √(k/m)). These defaults were checked on the demo scenarios.
 */

/** Health, from best to worst. */
export const STATUS_ORDER = ["ok", "watch", "inspect", "ground"] as const;
export type Status = (typeof STATUS_ORDER)[number];

/** The magnitude at which a finding reaches each step above ok (its unit is the threshold's). */
export type StepThresholds = Record<Exclude<Status, "ok">, number>;

export interface HealthThresholds {
  /** Level rise above the matched baseline, dB: band-rise, new-peak, motor-order, floor-rise. */
  levelDb: StepThresholds;
  /** Mode frequency change, percent of the baseline frequency. */
  modeShiftPct: StepThresholds;
  /** A level change must also exceed this many standard deviations of the expected scatter. */
  minSigma: number;
  /** Points taken off for a finding just at watch, inspect and ground magnitude. */
  penalty: StepThresholds;
  /** The points one finding approaches, never reaches, however large its magnitude. */
  maxPenalty: number;
  /** Score at or above which the status is ok / watch / inspect (below the last: ground). */
  scoreOk: number;
  scoreWatch: number;
  scoreInspect: number;
  /** Peaks this close (fraction of frequency) to a baseline peak are not new. */
  samePeakFraction: number;
  /**
   * A motor whose rpm telemetry is masked in more than this share of the log's order blocks is
   * not compared: with most blocks gone, what remains is the flying where telemetry happened to
   * work (e.g. gentle hover), not a fair match for the baseline. Half: the majority must be real.
   */
  maxMaskedShare: number;
}

export const DEFAULT_THRESHOLDS: HealthThresholds = {
  levelDb: { watch: 3, inspect: 6, ground: 12 },
  modeShiftPct: { watch: 3, inspect: 6, ground: 12 },
  minSigma: 3,
  penalty: { watch: 10, inspect: 25, ground: 50 },
  maxPenalty: 75,
  scoreOk: 80,
  scoreWatch: 60,
  scoreInspect: 35,
  samePeakFraction: 0.05,
  maxMaskedShare: 0.5,
};

/** The step a magnitude reaches, or null below watch. */
export function stepOf(magnitude: number, t: StepThresholds): Exclude<Status, "ok"> | null {
  if (magnitude >= t.ground) return "ground";
  if (magnitude >= t.inspect) return "inspect";
  if (magnitude >= t.watch) return "watch";
  return null;
}

/**
 * Points taken off for a magnitude: piecewise linear through (watch, 10), (inspect, 25),
 * (ground, 50), then rising at the same 25 points per ground-threshold's worth and bending towards
 * maxPenalty without reaching it. Strictly increasing above watch, so a worse finding always costs
 * more (a hard cap would score a crack at twice the ground magnitude like one at four times).
 */
export function penaltyFor(
  magnitude: number,
  t: StepThresholds,
  h: HealthThresholds = DEFAULT_THRESHOLDS,
): number {
  const p = h.penalty;
  if (magnitude < t.watch) return 0;
  let points: number;
  if (magnitude < t.inspect)
    points = p.watch + ((magnitude - t.watch) / (t.inspect - t.watch)) * (p.inspect - p.watch);
  else if (magnitude < t.ground)
    points =
      p.inspect + ((magnitude - t.inspect) / (t.ground - t.inspect)) * (p.ground - p.inspect);
  else {
    // Slope 25/ground at the ground step, as the old linear rise; the room above it decays.
    const room = h.maxPenalty - p.ground;
    points = p.ground + room * (1 - Math.exp(-((magnitude - t.ground) / t.ground) * (25 / room)));
  }
  return Math.round(points * 10) / 10;
}

/** Below this score the scale is no longer 100 minus the points but a tail that never reaches 0. */
const SCORE_TAIL_START = 10;

/**
 * The score for the points all findings took: 100 minus them down to 10, then 100/(points − 80),
 * which meets the straight line at 10 with the same slope and approaches 0 without reaching it.
 * A hard floor at 0 would tie every badly damaged airframe at the top of the queue; with the tail a
 * worse one still scores lower. Whole numbers above 10, three significant digits below.
 */
export function scoreForPoints(points: number): number {
  const straight = 100 - points;
  if (straight >= SCORE_TAIL_START) return Math.round(straight);
  const t = SCORE_TAIL_START;
  const tail = (t * t) / (points - (100 - 2 * t));
  // Three significant digits, so that even far down the tail two airframes do not tie.
  return Number(tail.toPrecision(3));
}

export function statusForScore(score: number, h: HealthThresholds = DEFAULT_THRESHOLDS): Status {
  if (score >= h.scoreOk) return "ok";
  if (score >= h.scoreWatch) return "watch";
  if (score >= h.scoreInspect) return "inspect";
  return "ground";
}

export function worstStatus(a: Status, b: Status): Status {
  return STATUS_ORDER.indexOf(a) >= STATUS_ORDER.indexOf(b) ? a : b;
}
