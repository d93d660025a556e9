import { DEFAULT_ANALYSIS, throttleBandLabel } from "../analysis/settings";
import type { LogAnalysis, ThrottleBandResult } from "../analysis/types";
import { AXES, type Axis } from "../logs/columns";
import { median, round, weightedMean } from "../signal/stats";
import {
  MODE_TRACK_PROMINENCE_DB,
  dbAt,
  type Baseline,
  type BaselineMode,
  type BaselineThrottleBand,
} from "./baseline";
import { peaksAboveLocalMedian } from "../signal/peaks";
import {
  DEFAULT_THRESHOLDS,
  penaltyFor,
  statusForScore,
  stepOf,
  worstStatus,
  type HealthThresholds,
  type Status,
  type StepThresholds,
} from "./thresholds";

/**
 * Compares one log with an airframe's baseline, like with like: only throttle bands that both
 * cover with enough data, only frequencies both logs can show, baseline levels interpolated to
 * the log's own mean throttle in each band. Harder flying moves time between bands; it does not
 * raise the level within a band, so it does not read as damage.
 */

export type FindingKind =
  "mode-shift" | "mode-lost" | "new-peak" | "band-rise" | "floor-rise" | "motor-order";

export interface Finding {
  axis: Axis;
  kind: FindingKind;
  freqHz: number;
  baselineFreqHz?: number;
  deltaDb?: number;
  shiftPct?: number;
  motor?: number;
  /** motor-order: the order that rose most (1 = the rotation rate) and every order that rose. */
  order?: number;
  orders?: number[];
  /** motor-order: a prop (whole orders only) or a loose motor (half orders too). */
  cause?: "prop" | "motor-mount";
  severity: Exclude<Status, "ok">;
  /** Points this finding took off the score. */
  points: number;
  text: string;
}

export interface NotCompared {
  what: string;
  reason: string;
}

export interface Assessment {
  score: number;
  status: Status;
  findings: Finding[];
  notCompared: NotCompared[];
  /** Throttle bands compared, as "38–50 %". */
  comparedBands: string[];
}

export interface CompareOptions {
  thresholds?: HealthThresholds;
  /** Names of motor positions for the sentences, e.g. { 3: "rear-right" }. */
  motorPositions?: Record<number, string>;
  /** Segments a throttle band of the log needs to be compared. Default: the analysis's minimum (8). */
  minBandSegments?: number;
}

interface MatchedBand {
  log: ThrottleBandResult;
  base: BaselineThrottleBand;
  label: string;
}

const MODE_SEARCH = { below: 0.7, above: 1.15 };

export function compareWithBaseline(
  log: LogAnalysis,
  baseline: Baseline,
  options: CompareOptions = {},
): Assessment {
  const h = options.thresholds ?? DEFAULT_THRESHOLDS;
  const minSegments = options.minBandSegments ?? DEFAULT_ANALYSIS.minBandSegments;
  const notCompared: NotCompared[] = [];
  const maxHz = Math.min(log.settings.maxFreqHz, baseline.maxFreqHz);
  if (log.settings.maxFreqHz < baseline.maxFreqHz - 1) {
    notCompared.push({
      what: `above ${Math.round(maxHz)} Hz`,
      reason: `this log was recorded at ${Math.round(log.sampleRateHz)} Hz and cannot show higher frequencies`,
    });
  } else if (baseline.maxFreqHz < log.settings.maxFreqHz - 1) {
    notCompared.push({
      what: `above ${Math.round(maxHz)} Hz`,
      reason: `the baseline logs were recorded at ${Math.round(baseline.sampleRateHz)} Hz`,
    });
  }
  if (log.hasThrottle !== baseline.hasThrottle) {
    notCompared.push({
      what: "throttle matching",
      reason:
        "only one of this log and the baseline has a throttle column; levels are compared over the whole log",
    });
  }

  // An axis without a usable signal in the log or the baseline is not compared: a log of zeros
  // or of a stuck gyro must never read as a quiet, healthy airframe.
  const axes = AXES.filter((axis) => {
    const problem =
      log.axes[axis].signal?.usable === false ? log.axes[axis].signal?.text : undefined;
    if (problem)
      notCompared.push({ what: `${axis} axis`, reason: `not usable in this log: ${problem}` });
    const inBaseline = baseline.unusableAxes?.find((u) => u.axis === axis);
    if (inBaseline && !problem)
      notCompared.push({
        what: `${axis} axis`,
        reason: `not usable in the baseline: ${inBaseline.reason}`,
      });
    return !problem && !inBaseline;
  });
  if (axes.length === 0)
    return unscored(
      notCompared,
      "no gyro axis carries a usable signal in both this log and the baseline, so the log is unusable and has no score",
    );

  const matched: MatchedBand[] = [];
  for (const band of log.throttleBands) {
    const label = throttleBandLabel(band.lo, band.hi);
    const base = baseline.throttleBands.find((b) => b.index === band.index);
    if (band.segments < minSegments) {
      if (band.segments > 0 && base)
        notCompared.push({
          what: `throttle ${label}`,
          reason: `only ${band.seconds.toFixed(1)} s in this log`,
        });
      continue;
    }
    if (!base) {
      notCompared.push({
        what: `throttle ${label}`,
        reason: "the baseline has no flying in this band",
      });
      continue;
    }
    matched.push({ log: band, base, label });
  }
  if (matched.length === 0)
    return unscored(
      notCompared,
      "no throttle band has enough flying in both this log and the baseline",
    );

  const positions = options.motorPositions ?? {};
  const untrusted = untrustedMotors(log, baseline, h, notCompared);
  const standings = orderStandings(axes, matched, baseline, untrusted, maxHz);
  const sigmaX = excessSigma(standings);
  const floor = floorRises(
    axes,
    log,
    baseline,
    matched,
    h,
    maxHz,
    bearingMotor(standings, h, sigmaX),
    positions,
  );
  // A motor named by the floor rise for its bearing tones is not named twice.
  // Broadband noise up high lifts every order up there at random, motor by motor: with a floor
  // rise, an order above the floor corner is not evidence against one motor.
  const cornerHz = Math.min(baseline.floorCornerHz, 0.6 * maxHz);
  const orders = motorOrders(
    standings.filter((x) => floor.length === 0 || x.rotationHz * x.order < cornerHz),
    positions,
    log.settings.bladeCount,
    h,
    sigmaX,
  ).filter(
    (f) => !(f.cause === "motor-mount" && floor.some((x) => x.motor === f.motor) && f.order !== 1),
  );
  const shifts = modeShifts(axes, log, baseline, matched, maxHz, h);
  const findings: Finding[] = [...shifts, ...orders, ...floor];
  const floorRise = findings.some((f) => f.kind === "floor-rise");
  // Broadband noise above the corner lifts every peak and band up there: the floor rise says it once.
  findings.push(
    ...newPeaks(axes, log, baseline, matched, shifts, maxHz, h).filter(
      (f) => !(floorRise && f.freqHz >= baseline.floorCornerHz),
    ),
  );
  findings.push(...bandRises(axes, log, matched, baseline, findings, h));
  findings.sort((a, b) => b.points - a.points);

  const taken = findings.reduce((s, f) => s + f.points, 0);
  const score = Math.max(0, Math.round(100 - taken));
  let status = statusForScore(score, h);
  for (const f of findings) status = worstStatus(status, f.severity);
  return { score, status, findings, notCompared, comparedBands: matched.map((m) => m.label) };
}

/**
 * Motors whose rpm telemetry was masked for too much of this log or of a baseline log: their
 * orders are not compared (a level from the few believable blocks would be biased towards the
 * flying where the telemetry happens to work), and the reason is listed.
 */
function untrustedMotors(
  log: LogAnalysis,
  baseline: Baseline,
  h: HealthThresholds,
  notCompared: NotCompared[],
): Set<number> {
  const out = new Set<number>();
  for (const m of log.motors) {
    const share = m.maskedShare ?? 0;
    if (share <= h.maxMaskedShare) continue;
    out.add(m.motor);
    const counts = m.maskedBlocks;
    const why = counts
      ? Object.entries(counts)
          .filter(([, n]) => n > 0)
          .sort((a, b) => b[1] - a[1])
          .map(([r]) => MASK_WORDS[r] ?? r)
          .join(", ")
      : "";
    notCompared.push({
      what: `motor ${m.motor} orders`,
      reason: `its rpm telemetry could not be believed in ${Math.round(share * 100)} % of the log${why ? ` (${why})` : ""}`,
    });
  }
  for (const motor of baseline.untrustedMotors ?? []) {
    if (out.has(motor)) continue;
    out.add(motor);
    notCompared.push({
      what: `motor ${motor} orders`,
      reason: "its rpm telemetry could not be believed in most of a baseline log",
    });
  }
  return out;
}

const MASK_WORDS: Record<string, string> = {
  zero: "reads 0",
  range: "outside what a motor can spin",
  stuck: "stuck at one value",
  slew: "jumps faster than a motor can accelerate",
};

/**
 * A log that could not be judged: no score (NaN, null in JSON and the database) and never ok,
 * because "nothing to see" is not "healthy".
 */
function unscored(notCompared: NotCompared[], reason: string): Assessment {
  return {
    score: Number.NaN,
    status: "watch",
    findings: [],
    notCompared: [...notCompared, { what: "whole log", reason }],
    comparedBands: [],
  };
}

/**
 * Baseline value at the log band's own mean throttle: linear in throttle between the baseline's
 * neighbouring bands, so a band flown a little harder is held to a slightly higher level.
 */
function atThrottle(
  baseline: Baseline,
  throttle: number,
  value: (b: BaselineThrottleBand) => number,
): number {
  const points = baseline.throttleBands
    .map((b) => ({ x: b.meanThrottle, y: value(b) }))
    .filter((p) => Number.isFinite(p.y))
    .sort((a, b) => a.x - b.x);
  const first = points[0];
  const last = points[points.length - 1];
  if (!first || !last) return Number.NaN;
  if (throttle <= first.x) return first.y;
  if (throttle >= last.x) return last.y;
  for (let i = 1; i < points.length; i++) {
    const p = points[i - 1];
    const q = points[i];
    if (p && q && throttle <= q.x) return p.y + ((q.y - p.y) * (throttle - p.x)) / (q.x - p.x);
  }
  return last.y;
}

function severityAndPoints(magnitude: number, t: StepThresholds, h: HealthThresholds) {
  const severity = stepOf(magnitude, t);
  return severity ? { severity, points: penaltyFor(magnitude, t, h) } : null;
}

/**
 * Each baseline mode followed into the log, throttle band by throttle band: in every compared
 * band where the baseline shows the mode, the log's band spectrum is searched from −30 % to
 * +15 % of the baseline's frequency there for a peak above the local median (a lower gate than
 * for new peaks, and no analysis band limits the search, so a mode may move out of its band).
 * The shift is the segment-weighted mean over the bands where both have it. A mode that every
 * baseline log had and that the log shows in none of the compared bands is lost.
 */
function modeShifts(
  axes: readonly Axis[],
  log: LogAnalysis,
  baseline: Baseline,
  matched: MatchedBand[],
  maxHz: number,
  h: HealthThresholds,
): Finding[] {
  const out: Finding[] = [];
  const binHz = log.settings.binHz;
  for (const axis of axes) {
    const modes = baseline.modes.filter(
      (m) => m.axis === axis && m.freqHz * MODE_SEARCH.above <= maxHz,
    );
    const sightings = new Map<BaselineMode, { shift: number; freqHz: number; weight: number }[]>();
    const expected = new Map<BaselineMode, number>();
    for (const band of matched) {
      const psd = band.log.axes[axis].psdDb;
      // Where each mode is expected in this band, and the candidates around it.
      const wanted = modes.flatMap((m) => {
        const inBand = m.bands
          ? m.bands.find((b) => b.index === band.base.index)
          : { freqHz: m.freqHz, levelDb: m.levelDb };
        return inBand ? [{ m, f: inBand.freqHz, level: inBand.levelDb }] : [];
      });
      for (const w of wanted) expected.set(w.m, (expected.get(w.m) ?? 0) + 1);
      const orderFreqs = band.log.motors
        .flatMap((x) => x.orders.filter((o) => Number.isInteger(o.order)).map((o) => o.freqHz))
        .filter((f) => f > 0);
      const pairs = wanted.flatMap((w) =>
        peaksAboveLocalMedian(
          psd,
          binHz,
          w.f * MODE_SEARCH.below,
          w.f * MODE_SEARCH.above,
          MODE_TRACK_PROMINENCE_DB,
        )
          // A peak away from the mode that sits on a motor order in this band is that order, not
          // the moved mode (an order passing right over the mode cannot be told from it).
          .filter(
            (p) =>
              Math.abs(p.freqHz - w.f) <= 0.03 * w.f ||
              !orderFreqs.some((f) => Math.abs(f - p.freqHz) <= 0.03 * p.freqHz),
          )
          // Greedy assignment by cost: relative frequency distance, with a level mismatch as
          // tie-breaker, so that a weak neighbouring mode cannot steal a strong one's peak.
          .map((p) => ({
            w,
            p,
            cost: Math.abs(Math.log(p.freqHz / w.f)) / 0.05 + Math.abs(p.levelDb - w.level) / 6,
          })),
      );
      pairs.sort((a, b) => a.cost - b.cost);
      const usedModes = new Set<BaselineMode>();
      const usedPeaks = new Set<number>();
      for (const { w, p } of pairs) {
        if (usedModes.has(w.m) || usedPeaks.has(p.bin)) continue;
        usedModes.add(w.m);
        usedPeaks.add(p.bin);
        const list = sightings.get(w.m) ?? [];
        list.push({ shift: (p.freqHz - w.f) / w.f, freqHz: p.freqHz, weight: band.log.segments });
        sightings.set(w.m, list);
      }
    }
    for (const m of modes) {
      const seen = sightings.get(m) ?? [];
      const bandsExpected = expected.get(m) ?? 0;
      if (seen.length === 0) {
        // Only a mode the baseline always had, expected in at least two compared bands, is
        // missed when it is nowhere in sight; anything less could be the baseline's luck.
        if (m.seenIn < baseline.logs || bandsExpected < 2) continue;
        const graded = severityAndPoints(h.modeShiftPct.inspect, h.modeShiftPct, h);
        if (!graded) continue;
        out.push({
          axis,
          kind: "mode-lost",
          freqHz: round(m.freqHz, 1),
          baselineFreqHz: round(m.freqHz, 1),
          ...graded,
          text: `${axis} mode at ${Math.round(m.freqHz)} Hz, in every baseline log, is gone: no peak from ${Math.round(m.freqHz * MODE_SEARCH.below)} to ${Math.round(m.freqHz * MODE_SEARCH.above)} Hz in any compared throttle band. A crack or loose screws can lower and damp a mode until it no longer shows: check the arms for cracks and the frame screws for tightness.`,
        });
        continue;
      }
      const weights = seen.map((x) => x.weight);
      const shiftPct =
        weightedMean(
          seen.map((x) => x.shift),
          weights,
        ) * 100;
      const nowHz = weightedMean(
        seen.map((x) => x.freqHz),
        weights,
      );
      // The baseline's own scatter of this mode is not held against the log.
      // A frame does not stiffen by itself: a rise is most often a peak estimate wobbling on a broad
      // mode, so it counts half.
      const magnitude = (shiftPct < 0 ? -shiftPct : shiftPct / 2) - m.spreadPct / 2;
      const graded = severityAndPoints(magnitude, h.modeShiftPct, h);
      if (!graded) continue;
      const dropped = shiftPct < 0;
      const drop = -shiftPct / 100;
      const stiffnessLoss = (1 - (1 - drop) ** 2) * 100;
      const text = dropped
        ? `${axis} mode at ${Math.round(m.freqHz)} Hz dropped ${Math.abs(shiftPct).toFixed(0)} % since baseline (now ${Math.round(nowHz)} Hz): about ${stiffnessLoss.toFixed(0)} % less stiffness. Check the arms for cracks and the frame screws for tightness.`
        : `${axis} mode at ${Math.round(m.freqHz)} Hz rose ${shiftPct.toFixed(0)} % since baseline (now ${Math.round(nowHz)} Hz): the frame is stiffer or lighter than it was. If arms or the stack were changed, set a new baseline.`;
      // A stiffer frame is a change to note, not a danger.
      const severity = dropped ? graded.severity : "watch";
      const points = dropped ? graded.points : Math.min(graded.points, h.penalty.watch);
      out.push({
        axis,
        kind: "mode-shift",
        freqHz: round(nowHz, 1),
        baselineFreqHz: round(m.freqHz, 1),
        shiftPct: round(shiftPct, 1),
        severity,
        points,
        text,
      });
    }
  }
  return out;
}

/** How one motor's order stands in this log: against its own baseline and against the other motors. */
interface OrderStanding {
  motor: number;
  order: number;
  /** The sidebands of a whole order (tones 0.05–0.25 orders away) rather than the order itself. */
  side: boolean;
  axis: Axis;
  /** Rise over the motor's own baseline at matched throttle, dB (segment-weighted over bands). */
  ownDb: number;
  /** ownDb less the median rise of the other motors at the same order and axis, dB. */
  excessDb: number;
  /** Standard deviation expected of ownDb on a healthy airframe, dB. */
  sigmaDb: number;
  /** The motor's rotation rate over the compared bands, Hz. */
  rotationHz: number;
}

/**
 * 10/ln 10 dB: the standard deviation, in dB, of one block's power of a noise-like order is about
 * this (the power of a demodulated noise bin is χ² with 2 degrees of freedom, i.e. exponential;
 * Welch 1967, and the delta method for 10·log10), so a mean over N blocks scatters 4.34/√N dB.
 */
const DB_PER_UNIT_LOG = 10 / Math.LN10;

function orderStandings(
  axes: readonly Axis[],
  matched: MatchedBand[],
  baseline: Baseline,
  excluded: ReadonlySet<number>,
  maxHz: number,
): OrderStanding[] {
  const raw: Omit<OrderStanding, "excessDb">[] = [];
  for (const motor of baseline.motors) {
    if (excluded.has(motor)) continue;
    const orderSet = new Set(
      matched.flatMap(
        (m) => m.log.motors.find((x) => x.motor === motor)?.orders.map((o) => o.order) ?? [],
      ),
    );
    for (const order of orderSet)
      for (const side of Number.isInteger(order) ? [false, true] : [false]) {
        for (const axis of axes) {
          let wSum = 0;
          let dSum = 0;
          let varSum = 0;
          let fSum = 0;
          for (const m of matched) {
            const lm = m.log.motors.find((x) => x.motor === motor);
            const lo = lm?.orders.find((o) => o.order === order);
            const level = side ? lo?.sideDb?.[axis] : lo?.powerDb[axis];
            if (!lm || !lo || level === undefined || !Number.isFinite(level) || !(lm.meanRpm > 0))
              continue;
            // Near the top of the common range some of the band's blocks measured the order and
            // others did not (or the baseline could): keep a 10 % margin for the rpm's spread.
            if (
              (order * lm.meanRpm * 1.1) / 60 > maxHz ||
              (order * lm.meanRpm) / 60 < baseline.minFreqHz
            )
              continue;
            const bm = m.base.motors.find((x) => x.motor === motor);
            const bo =
              bm?.orders?.find((o) => o.order === order) ??
              (order === 1 && bm && !side
                ? { db: bm.order1Db, logSpreadDb: bm.logSpreadDb, blocks: 0 }
                : undefined);
            const expected = atThrottle(baseline, m.log.meanThrottle, (b) => {
              const x = b.motors.find((y) => y.motor === motor);
              const o = x?.orders?.find((y) => y.order === order);
              if (side) return o?.sideDb?.[axis] ?? Number.NaN;
              return o ? o.db[axis] : order === 1 && x ? x.order1Db[axis] : Number.NaN;
            });
            if (!bo || !Number.isFinite(expected)) continue;
            const nLog = Math.max(1, (lm.blocks ?? m.log.segments) - (lm.maskedBlocks ?? 0));
            const nBase = Math.max(1, bo.blocks || m.base.segments);
            const variance = DB_PER_UNIT_LOG ** 2 * (1 / nLog + 1 / nBase) + bo.logSpreadDb ** 2;
            const w = m.log.segments;
            wSum += w;
            dSum += w * (level - expected);
            varSum += w * w * variance;
            fSum += w * (lm.meanRpm / 60);
          }
          if (wSum > 0)
            raw.push({
              motor,
              order,
              side,
              axis,
              ownDb: dSum / wSum,
              sigmaDb: Math.sqrt(varSum) / wSum,
              rotationHz: fSum / wSum,
            });
        }
      }
  }
  return raw.map((r) => {
    const others = raw
      .filter(
        (x) => x.motor !== r.motor && x.order === r.order && x.side === r.side && x.axis === r.axis,
      )
      .map((x) => x.ownDb);
    return { ...r, excessDb: others.length > 0 ? r.ownDb - median(others) : Number.NaN };
  });
}

/**
 * Whether an order of a motor rose against both its own baseline and the other motors: by the
 * level step, beyond the scatter a healthy airframe shows. The rise over its own baseline must
 * exceed minSigma of its expected scatter (block counts and the baseline logs' spread); the rise
 * over the other motors must exceed minSigma robust standard deviations (1.4826 × the median
 * absolute deviation; Rousseeuw & Croux 1993) of that same difference over every motor, order
 * and axis of this log — what healthy motors' orders wander by in this flight. Both must reach
 * the watch step. The magnitude graded is the rise over its own baseline (a strong tone leaks a
 * little into near-identical motors' orders, so the rise over the others understates it).
 */
function standsOut(
  s: OrderStanding,
  h: HealthThresholds,
  excessSigmaDb: (s: OrderStanding) => number,
): number {
  if (
    !Number.isFinite(s.excessDb) ||
    !(s.ownDb >= h.minSigma * s.sigmaDb) ||
    !(s.excessDb >= h.minSigma * excessSigmaDb(s))
  )
    return Number.NaN;
  return Math.min(s.ownDb, s.excessDb) >= h.levelDb.watch ? s.ownDb : Number.NaN;
}

/** 1.4826 × MAD: a robust standard deviation (Rousseeuw & Croux 1993), at least 0.5 dB. */
function robustSigma(values: readonly number[]): number {
  const e = values.filter(Number.isFinite);
  const med = median(e);
  return Math.max(0.5, 1.4826 * median(e.map((x) => Math.abs(x - med))));
}

/**
 * The scatter of the rises over the other motors, per order (and sidebands apart): the larger
 * of that order's robust spread over the other motors' axes and the spread over every order. An
 * order that the flight controller notches away is noise-like and wanders more than one that
 * stands clear, so each is judged by its own kind.
 */
function excessSigma(standings: OrderStanding[]): (s: OrderStanding) => number {
  const all = robustSigma(standings.map((s) => s.excessDb));
  const perKey = new Map<string, number>();
  // The spread of the order is taken over the other motors only: the motor judged is not
  // allowed to widen the yardstick it is judged by.
  return (s) => {
    const key = `${s.motor}/${s.order}/${s.side}`;
    let sigma = perKey.get(key);
    if (sigma === undefined) {
      sigma = robustSigma(
        standings
          .filter((x) => x.motor !== s.motor && x.order === s.order && x.side === s.side)
          .map((x) => x.excessDb),
      );
      perKey.set(key, sigma);
    }
    return Math.max(all, sigma);
  };
}

/** The order itself, at a whole multiple of the rotation (not its sidebands, not a half order). */
const isWhole = (s: OrderStanding) => Number.isInteger(s.order) && !s.side;
const betweenName = (s: OrderStanding) => (s.side ? `sidebands of ${s.order}×` : `${s.order}×`);

function orderName(order: number, bladeCount: number): string {
  if (order === 1) return "its rotation rate";
  if (order === bladeCount) return `its blade-pass rate (${order}× its rotation)`;
  return `${order}× its rotation rate`;
}

function motorOrders(
  standings: OrderStanding[],
  positions: Record<number, string>,
  bladeCount: number,
  h: HealthThresholds,
  sigmaX: (s: OrderStanding) => number,
): Finding[] {
  const out: Finding[] = [];
  for (const motor of new Set(standings.map((s) => s.motor))) {
    const risen = standings
      .filter((s) => s.motor === motor)
      .map((s) => ({ s, magnitude: standsOut(s, h, sigmaX) }))
      .filter((x) => Number.isFinite(x.magnitude))
      .sort((a, b) => b.magnitude - a.magnitude);
    // A bent or chipped prop shakes at its motor's whole orders (the flight controller's notches
    // may take most of the 1× away, leaving 2× and above); a loose motor rattles, which adds
    // half orders (sub-harmonics and sidebands) to the whole ones. Half orders alone, without a
    // whole one, are the bearing's tones: the floor-rise finding names that motor.
    const whole = risen.filter((x) => isWhole(x.s));
    const top = whole[0];
    if (!top) continue;
    const halves = risen.filter((x) => !isWhole(x.s));
    const graded = severityAndPoints(top.magnitude, h.levelDb, h);
    if (!graded) continue;
    const { s } = top;
    const where = positions[motor] ? ` (${positions[motor]})` : "";
    const orders = [...new Set(whole.map((x) => x.s.order))].sort((a, b) => a - b);
    // Sidebands alone do not make a rattle: a strong or smeared 1× spills beside itself too.
    const rattle = halves.some((x) => !x.s.side);
    const at = `${orderName(s.order, bladeCount)} (about ${Math.round(s.rotationHz * s.order)} Hz${s.order === 1 ? "" : `; it turns at ${Math.round(s.rotationHz)} Hz`})`;
    const advice = rattle
      ? `with tones between its orders (${[...new Set(halves.map((x) => betweenName(x.s)))].slice(0, 3).join(", ")}) as a loose part rattles: check that motor's screws and mount, then its prop.`
      : "look for a bent or chipped prop on it, then a bent motor shaft.";
    out.push({
      axis: s.axis,
      kind: "motor-order",
      freqHz: round(s.rotationHz, 1),
      motor,
      order: s.order,
      orders,
      cause: rattle ? "motor-mount" : "prop",
      deltaDb: round(s.ownDb, 1),
      ...graded,
      text: `motor ${motor}${where} vibrates ${s.ownDb.toFixed(0)} dB more at ${at} than in the baseline, and more than the other motors: ${advice}`,
    });
  }
  return out;
}

/** The motor whose half orders (tones between its whole orders) rose most, against both references. */
function bearingMotor(
  standings: OrderStanding[],
  h: HealthThresholds,
  sigmaX: (s: OrderStanding) => number,
): OrderStanding | null {
  let best: { s: OrderStanding; magnitude: number } | null = null;
  for (const s of standings) {
    if (isWhole(s)) continue;
    const magnitude = standsOut(s, h, sigmaX);
    if (Number.isFinite(magnitude) && (!best || magnitude > best.magnitude))
      best = { s, magnitude };
  }
  return best?.s ?? null;
}

/**
 * New resonances, seen wherever they fall: per compared throttle band and bin, the log's band
 * spectrum less the baseline's there, judged against the scatter expected of it — the Welch
 * estimate of K segments scatters about 4.34/√K dB per bin (χ² with 2K degrees of freedom;
 * Welch 1967), in the log and in the baseline, plus the baseline logs' own spread at that bin.
 * The excess is averaged over the bands (weighted by segments); where the log shows a peak above
 * its local median, an excess at least the watch step and minSigma expected deviations up, that
 * stands minSigma robust deviations above the excess around it, and that recurs in at least half
 * of the bands judging it, is a new peak. Bins near a motor's whole orders in a band (orders move with
 * throttle and have their own finding), near a moved or lost mode, or at a known (recurring)
 * baseline peak are not counted.
 */
function newPeaks(
  axes: readonly Axis[],
  log: LogAnalysis,
  baseline: Baseline,
  matched: MatchedBand[],
  shifts: Finding[],
  maxHz: number,
  h: HealthThresholds,
): Finding[] {
  const found: Finding[] = [];
  const binHz = log.settings.binHz;
  const first = Math.ceil(baseline.minFreqHz / binHz);
  const last = Math.floor(maxHz / binHz);
  if (last - first < 3) return [];
  for (const axis of axes) {
    const sum = new Float64Array(last + 1);
    const wsum = new Float64Array(last + 1);
    const var2 = new Float64Array(last + 1);
    const logSum = new Float64Array(last + 1);
    // Per band: the bins it judged and where it saw the watch step's excess (for the recurrence rule).
    const judged = new Float64Array(last + 1);
    const risen = new Float64Array(last + 1);
    for (const m of matched) {
      const orderFreqs = m.log.motors
        .flatMap((x) => x.orders.filter((o) => Number.isInteger(o.order)).map((o) => o.freqHz))
        .filter((f) => f > 0);
      // Within a throttle band each order sweeps as rpm does, rpm ∝ √throttle (thrust ∝ rpm²):
      // a half-width of (√hi − √lo)/(√hi + √lo) around its mean, and 2 % for the motors' spread.
      const sweep =
        (Math.sqrt(m.log.hi) - Math.sqrt(m.log.lo)) / (Math.sqrt(m.log.hi) + Math.sqrt(m.log.lo)) +
        0.02;
      const w = m.log.segments;
      const chi =
        DB_PER_UNIT_LOG ** 2 * (1 / Math.max(1, m.log.segments) + 1 / Math.max(1, m.base.segments));
      const spread = m.base.axes[axis].psdLogSpreadDb;
      for (let k = first; k <= last; k++) {
        const f = k * binHz;
        const level = m.log.axes[axis].psdDb[k] ?? Number.NaN;
        logSum[k] = (logSum[k] ?? 0) + w * (Number.isFinite(level) ? level : 0);
        if (orderFreqs.some((o) => Math.abs(o - f) <= sweep * o)) continue;
        const base = dbAt(m.base.axes[axis].psdDb, baseline.binHz, f);
        if (!Number.isFinite(level) || !Number.isFinite(base)) continue;
        const s = spread ? dbAt(spread, baseline.binHz, f) : 0;
        sum[k] = (sum[k] ?? 0) + w * (level - base);
        judged[k] = (judged[k] ?? 0) + 1;
        if (level - base >= h.levelDb.watch) risen[k] = (risen[k] ?? 0) + 1;
        wsum[k] = (wsum[k] ?? 0) + w;
        var2[k] = (var2[k] ?? 0) + w * w * (chi + (Number.isFinite(s) ? s * s : 0));
      }
    }
    const total = matched.reduce((s, m) => s + m.log.segments, 0);
    const excess = new Float64Array(last + 1).fill(Number.NaN);
    const sigma = new Float64Array(last + 1).fill(Number.NaN);
    const logDb = new Float64Array(last + 1);
    for (let k = first; k <= last; k++) {
      logDb[k] = (logSum[k] ?? 0) / Math.max(1, total);
      const w = wsum[k] ?? 0;
      // A bin that most bands could not judge (motor orders sweep over it) is left out.
      if (w < 0.5 * total) continue;
      excess[k] = (sum[k] ?? 0) / w;
      sigma[k] = Math.sqrt(var2[k] ?? 0) / w;
    }
    // How this flight's spectrum wanders from the baseline's, bin to bin, around its own local
    // level: the excess less its running median (a broadband rise is the floor's and the bands'
    // finding), and the robust spread of that over the axis's bins. A new resonance is an
    // outlier of it; the theoretical scatter alone underestimates a real flight's.
    const local = new Float64Array(last + 1).fill(Number.NaN);
    for (let k = first; k <= last; k++) {
      const e = excess[k] ?? Number.NaN;
      if (!Number.isFinite(e)) continue;
      const half = Math.max(3, Math.round(0.15 * k));
      const around: number[] = [];
      for (let j = Math.max(first, k - half); j <= Math.min(last, k + half); j++) {
        const v = excess[j] ?? Number.NaN;
        if (Number.isFinite(v)) around.push(v);
      }
      local[k] = e - median(around);
    }
    const wander = robustSigma(Array.from(local));
    const tonal = peaksAboveLocalMedian(
      logDb,
      binHz,
      baseline.minFreqHz,
      maxHz,
      MODE_TRACK_PROMINENCE_DB,
    );
    for (const p of tonal) {
      // The largest excess within ±1 bin of the log's peak.
      let best = Number.NaN;
      let at = p.bin;
      for (let k = p.bin - 1; k <= p.bin + 1; k++) {
        const e = excess[k] ?? Number.NaN;
        if (Number.isFinite(e) && !(e <= best)) {
          best = e;
          at = k;
        }
      }
      const s = sigma[at] ?? Number.NaN;
      const above = local[at] ?? Number.NaN;
      if (
        !Number.isFinite(best) ||
        !(best >= h.minSigma * s) ||
        !(above >= h.minSigma * wander) ||
        !(above >= h.levelDb.watch)
      )
        continue;
      // A resonance stays put across throttle: it must be up in at least half of the bands that
      // judged the bin (and two of them, when two or more did), not only on average.
      const bands = judged[at] ?? 0;
      if (!((risen[at] ?? 0) >= Math.max(Math.min(2, bands), Math.ceil(bands / 2)))) continue;
      // A frame mode shows on every axis it couples into: a known peak or mode of any axis is
      // not new on this one (it may still be a band rise).
      const known =
        AXES.some((x) =>
          baseline.peaks[x].some((f) => Math.abs(f - p.freqHz) <= h.samePeakFraction * p.freqHz),
        ) ||
        baseline.modes.some(
          (m) => Math.abs(m.freqHz - p.freqHz) <= h.samePeakFraction * p.freqHz,
        ) ||
        shifts.some(
          (x) =>
            Math.abs(x.freqHz - p.freqHz) <= h.samePeakFraction * p.freqHz ||
            Math.abs((x.baselineFreqHz ?? 0) - p.freqHz) <= h.samePeakFraction * p.freqHz,
        );
      if (known) continue;
      const graded = severityAndPoints(best, h.levelDb, h);
      if (!graded) continue;
      found.push({
        axis,
        kind: "new-peak",
        freqHz: round(p.freqHz, 1),
        deltaDb: round(best, 1),
        ...graded,
        text: `new ${axis} peak at ${Math.round(p.freqHz)} Hz, ${best.toFixed(0)} dB above the baseline there: something has come loose or is touching. Check the flight-controller stack, camera mount, antenna and battery strap.`,
      });
    }
  }
  // One loose part shows on several axes: keep the strongest sighting of each frequency.
  return keepStrongestPerFrequency(found, h.samePeakFraction);
}

function floorRises(
  axes: readonly Axis[],
  log: LogAnalysis,
  baseline: Baseline,
  matched: MatchedBand[],
  h: HealthThresholds,
  maxHz: number,
  bearing: OrderStanding | null,
  positions: Record<number, string>,
): Finding[] {
  // Both floors over the same range: the baseline's corner, lowered like the analysis does for a
  // log that cannot reach it, up to the top both can show.
  const cornerHz = Math.min(baseline.floorCornerHz, 0.6 * maxHz);
  if (cornerHz >= maxHz) return [];
  const perAxis = axes
    .map((axis) => {
      const deltas = matched.map(
        (m) =>
          floorOver(m.log.axes[axis].psdDb, log.settings.binHz, cornerHz, maxHz) -
          floorOver(m.base.axes[axis].psdDb, baseline.binHz, cornerHz, maxHz),
      );
      return {
        axis,
        delta: weightedMean(
          deltas,
          matched.map((m) => m.log.segments),
        ),
      };
    })
    .filter((x) => Number.isFinite(x.delta));
  perAxis.sort((a, b) => b.delta - a.delta);
  const top = perAxis[0];
  if (!top) return [];
  const graded = severityAndPoints(top.delta, h.levelDb, h);
  if (!graded) return [];
  const others = perAxis
    .slice(1)
    .filter((x) => x.delta >= h.levelDb.watch)
    .map((x) => x.axis);
  const also = others.length > 0 ? ` (also ${others.join(" and ")})` : "";
  const centre = Math.sqrt(cornerHz * maxHz);
  // A worn bearing rings at its motor's non-integer orders: the motor whose half orders rose
  // against its own baseline and the other motors is the one to check first.
  const named = bearing
    ? `, with tones between the whole orders of motor ${bearing.motor}${positions[bearing.motor] ? ` (${positions[bearing.motor]})` : ""} (${betweenName(bearing)} its rotation up ${bearing.ownDb.toFixed(0)} dB): typical of a worn bearing in that motor. With the battery disconnected, spin it by hand and feel for roughness.`
    : ": typical of worn motor bearings or damaged props. With the battery disconnected, spin each motor by hand and feel for roughness.";
  return [
    {
      axis: top.axis,
      kind: "floor-rise",
      freqHz: round(centre, 0),
      deltaDb: round(top.delta, 1),
      ...(bearing ? { motor: bearing.motor, order: bearing.order } : {}),
      ...graded,
      text: `broadband noise above ${Math.round(cornerHz)} Hz is up ${top.delta.toFixed(0)} dB on ${top.axis}${also}${named}`,
    },
  ];
}

function bandRises(
  axes: readonly Axis[],
  log: LogAnalysis,
  matched: MatchedBand[],
  baseline: Baseline,
  specific: Finding[],
  h: HealthThresholds,
): Finding[] {
  const found: Finding[] = [];
  const hasFloorRise = specific.some((f) => f.kind === "floor-rise");
  baseline.bands.forEach((band, b) => {
    // A more specific finding inside the band already explains its rise.
    // A resonance that moved or appeared lifts its skirts too: it explains bands within ±40 % of it.
    const explained =
      specific.some(
        (f) =>
          (f.kind === "mode-shift" || f.kind === "mode-lost" || f.kind === "new-peak") &&
          band.hiHz > 0.6 * f.freqHz &&
          band.loHz < 1.4 * f.freqHz,
      ) ||
      (hasFloorRise && band.loHz >= baseline.floorCornerHz * 0.9) ||
      specific.some(
        (f) =>
          f.kind === "motor-order" &&
          matched.some((m) => {
            const order =
              m.log.motors
                .find((x) => x.motor === f.motor)
                ?.orders.find((o) => o.order === (f.order ?? 1))?.freqHz ?? 0;
            return order >= band.loHz && order < band.hiHz;
          }),
      );
    if (explained) return;
    const i = log.bands.findIndex((x) => x.loHz === band.loHz && x.hiHz === band.hiHz);
    if (i < 0) return;
    let best: { axis: Axis; delta: number } | null = null;
    for (const axis of axes) {
      const deltas: number[] = [];
      const weights: number[] = [];
      let variance = 0;
      for (const m of matched) {
        const level = m.log.axes[axis].bandDb[i] ?? Number.NaN;
        const expected = atThrottle(
          baseline,
          m.log.meanThrottle,
          (x) => x.axes[axis].bandDb[b] ?? Number.NaN,
        );
        deltas.push(level - expected);
        weights.push(m.log.segments);
        const seg = m.base.axes[axis].segmentSpreadDb[b] ?? 1;
        const logs = m.base.axes[axis].logSpreadDb[b] ?? 0;
        variance +=
          (seg * seg) / m.log.segments +
          (seg * seg) / Math.max(1, m.base.segmentsPerLog) +
          logs * logs;
      }
      const delta = weightedMean(deltas, weights);
      const sigma = Math.sqrt(variance / Math.max(1, deltas.length));
      if (!Number.isFinite(delta) || delta < h.minSigma * sigma) continue;
      if (!best || delta > best.delta) best = { axis, delta };
    }
    if (!best) return;
    const graded = severityAndPoints(best.delta, h.levelDb, h);
    if (!graded) return;
    const high = band.loHz >= baseline.floorCornerHz * 0.9;
    const advice = high
      ? "typical of a worn motor bearing or a damaged prop. With the battery disconnected, spin each motor by hand and feel for roughness."
      : "look for loose screws, a cracked mount or a part rubbing.";
    found.push({
      axis: best.axis,
      kind: "band-rise",
      freqHz: round(Math.sqrt(band.loHz * band.hiHz), 0),
      deltaDb: round(best.delta, 1),
      ...graded,
      text: `${best.axis} vibration between ${band.loHz} and ${band.hiHz} Hz is up ${best.delta.toFixed(0)} dB at matched throttle: ${advice}`,
    });
  });
  return found;
}

/** Median of a dB spectrum over [loHz, hiHz]: the noise floor there. */
function floorOver(psdDb: readonly number[], binHz: number, loHz: number, hiHz: number): number {
  const first = Math.ceil(loHz / binHz);
  const last = Math.min(psdDb.length - 1, Math.floor(hiHz / binHz));
  return median(psdDb.slice(first, last + 1));
}

function keepStrongestPerFrequency(findings: Finding[], fraction: number): Finding[] {
  const sorted = [...findings].sort(
    (a, b) => b.points - a.points || (b.deltaDb ?? 0) - (a.deltaDb ?? 0),
  );
  const kept: Finding[] = [];
  for (const f of sorted) {
    if (!kept.some((k) => Math.abs(k.freqHz - f.freqHz) <= fraction * f.freqHz)) kept.push(f);
  }
  return kept;
}
