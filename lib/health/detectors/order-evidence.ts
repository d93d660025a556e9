import type { Axis } from "../../logs/columns";
import { foldedHz, foldsWhole } from "../../signal/folding";
import { mean, median } from "../../signal/stats";
import type { HealthThresholds } from "../thresholds";
import type { DetectorContext } from "./context";
import { atThrottle, DB_PER_UNIT_LOG, MEDIAN_SCATTER, robustSigma } from "./shared";

/** How one motor's order stands in this log: against its own baseline and against the other motors. */
export interface OrderStanding {
  motor: number;
  order: number;
  /**
   * Beside the order rather than the order itself: a whole order's sidebands (tones 0.05–0.25
   * orders away), or the strongest tone within ±0.25 of a half order (between the whole orders).
   */
  side: boolean;
  axis: Axis;
  /**
   * Rise over the motor's own baseline, dB: at matched rpm (weighted by the log's blocks per rpm
   * bin) when both carry rpm maps, else at matched throttle (weighted by segments per band).
   */
  ownDb: number;
  /** ownDb less the median rise of the other motors at the same order and axis, dB. */
  excessDb: number;
  /** excessDb averaged over the compared axes of the same motor and order, and how many axes that is. */
  axesExcessDb: number;
  axesCompared: number;
  /** Standard deviation expected of ownDb on a healthy airframe, dB. */
  sigmaDb: number;
  /** The motor's rotation rate over the compared bins or bands, Hz. */
  rotationHz: number;
}

/** The motor orders of one comparison, judged once and read by the motor-order and floor detectors. */
export interface OrderEvidence {
  standings: readonly OrderStanding[];
  /** The scatter a standing's rise over the other motors is judged by, dB. */
  excessSigmaDb: (s: OrderStanding) => number;
  /** The motor whose half orders (tones between its whole orders) rose most, if any stands out. */
  bearing: OrderStanding | null;
}

/**
 * An order is compared only below the top of the common range by this factor of its mean
 * frequency: near the top some of a band's blocks measured it and others did not (or the
 * baseline could), and the rpm spreads about its mean by some 10 %.
 */
const RPM_SPREAD_MARGIN = 1.1;

/** The inputs the evidence is built from: the comparison without the detectors' own results. */
export type OrderInputs = Pick<
  DetectorContext,
  "log" | "baseline" | "thresholds" | "axes" | "matched" | "maxHz"
>;

/** Every compared motor order, its scatter and the bearing motor; motors in `excluded` are skipped. */
export function orderEvidence(ctx: OrderInputs, excluded: ReadonlySet<number>): OrderEvidence {
  const standings = orderStandings(ctx, excluded);
  const excessSigmaDb = excessSigma(standings);
  return {
    standings,
    excessSigmaDb,
    bearing: bearingMotor(standings, ctx.thresholds, excessSigmaDb),
  };
}

/** What decides whether an order can be compared: the log's rate, the baseline's, the common range. */
export interface OrderRange {
  sampleRateHz: number;
  /** Each baseline log's sample rate (absent in baselines built before version 4). */
  baselineRatesHz: readonly number[] | undefined;
  minFreqHz: number;
  maxHz: number;
}

function orderRange(ctx: Pick<OrderInputs, "log" | "baseline" | "maxHz">): OrderRange {
  return {
    sampleRateHz: ctx.log.sampleRateHz,
    baselineRatesHz: ctx.baseline.logRatesHz,
    minFreqHz: ctx.baseline.minFreqHz,
    maxHz: ctx.maxHz,
  };
}

/**
 * Whether an order at about `freqHz` (within the factor `margin` either way) is compared: inside
 * the range both sides show; or, a whole order above the log's Nyquist frequency, where it folds
 * (lib/signal/folding.ts), when the log and every baseline log were sampled at the same rate, so
 * that the folded tone lands at the same frequency, among the same frame response, on both sides.
 */
export function comparableOrder(
  range: OrderRange,
  order: number,
  freqHz: number,
  margin: number,
): boolean {
  const { sampleRateHz: fs, baselineRatesHz: rates, minFreqHz, maxHz } = range;
  const lo = freqHz / margin;
  const hi = freqHz * margin;
  if (hi <= maxHz) return freqHz >= minFreqHz;
  const sameRate = rates !== undefined && rates.length > 0 && rates.every((r) => r === fs);
  if (!sameRate || !Number.isInteger(order) || lo <= fs / 2 || !foldsWhole(lo, hi, fs))
    return false;
  const ends = [foldedHz(lo, fs), foldedHz(hi, fs)];
  return Math.min(...ends) >= minFreqHz && Math.max(...ends) <= maxHz;
}

/** A standing before it is held against the other motors. */
export type RawStanding = Omit<OrderStanding, "excessDb" | "axesExcessDb" | "axesCompared">;

/** A rotation bin is compared when both the log and the baseline measured it in this many blocks. */
const MIN_RPM_BIN_BLOCKS = 2;
/** An order is compared in a rotation bin only below the top of the common range by this factor (one bin's width). */
const RPM_BIN_MARGIN = 1.03;

/**
 * How each motor's orders stand at matched rpm: in every bin of the motor's own rotation rate that
 * both the log and the baseline measured, the log's level less the baseline's, weighted by the
 * log's blocks there. Used when both carry rpm maps; older analyses and baselines are compared
 * at matched throttle (below). The expected scatter is the medians' own (block counts on both
 * sides); what the flight adds beyond it is judged by the rise over the other motors, whose
 * yardstick is the spread of every motor's rises in this same log (excessSigma).
 */
function rpmMatchedStandings(
  ctx: OrderInputs,
  excluded: ReadonlySet<number>,
): RawStanding[] | null {
  const { baseline, axes, log } = ctx;
  const range = orderRange(ctx);
  const maps = baseline.rpmMaps;
  if (!maps || !log.motors.every((m) => m.rpmMap)) return null;
  const raw: RawStanding[] = [];
  for (const motor of baseline.motors) {
    if (excluded.has(motor)) continue;
    const logBins = log.motors.find((m) => m.motor === motor)?.rpmMap ?? [];
    const baseBins = new Map(
      (maps.find((m) => m.motor === motor)?.bins ?? []).map((b) => [b.bin, b]),
    );
    const orders = [...new Set(logBins.flatMap((b) => b.orders.map((o) => o.order)))];
    for (const order of orders)
      for (const side of [false, true])
        for (const axis of axes) {
          const sum = new RiseSum();
          for (const lb of logBins) {
            const bb = baseBins.get(lb.bin);
            if (!bb || lb.blocks < MIN_RPM_BIN_BLOCKS || bb.blocks < MIN_RPM_BIN_BLOCKS) continue;
            const f = order * lb.rotationHz;
            if (!comparableOrder(range, order, f, RPM_BIN_MARGIN)) continue;
            const lo = lb.orders.find((o) => o.order === order);
            const bo = bb.orders.find((o) => o.order === order);
            const level = side ? lo?.sideDb?.[axis] : lo?.powerDb[axis];
            const expected = side ? bo?.sideDb?.[axis] : bo?.db[axis];
            if (level === undefined || expected === undefined) continue;
            if (!Number.isFinite(level) || !Number.isFinite(expected)) continue;
            const variance = medianVariance(lb.blocks, bb.blocks);
            sum.add(lb.blocks, level - expected, variance, lb.rotationHz);
          }
          const standing = sum.standing({ motor, order, side, axis });
          if (standing) raw.push(standing);
        }
  }
  return raw;
}

function orderStandings(ctx: OrderInputs, excluded: ReadonlySet<number>): OrderStanding[] {
  return heldAgainstOthers(
    rpmMatchedStandings(ctx, excluded) ?? throttleMatchedStandings(ctx, excluded),
  );
}

/** Each rise held against the median of the other motors' at the same order and axis, and that averaged over the axes. */
export function heldAgainstOthers(raw: readonly RawStanding[]): OrderStanding[] {
  const withExcess = raw.map((r) => {
    const others = raw
      .filter(
        (x) => x.motor !== r.motor && x.order === r.order && x.side === r.side && x.axis === r.axis,
      )
      .map((x) => x.ownDb);
    return { ...r, excessDb: others.length > 0 ? r.ownDb - median(others) : Number.NaN };
  });
  return withExcess.map((r) => {
    const same = withExcess
      .filter(
        (x) =>
          x.motor === r.motor &&
          x.order === r.order &&
          x.side === r.side &&
          Number.isFinite(x.excessDb),
      )
      .map((x) => x.excessDb);
    return { ...r, axesExcessDb: mean(same), axesCompared: same.length };
  });
}

function throttleMatchedStandings(ctx: OrderInputs, excluded: ReadonlySet<number>): RawStanding[] {
  const { baseline, axes, matched } = ctx;
  const range = orderRange(ctx);
  const raw: RawStanding[] = [];
  for (const motor of baseline.motors) {
    if (excluded.has(motor)) continue;
    const orderSet = new Set(
      matched.flatMap(
        (m) => m.log.motors.find((x) => x.motor === motor)?.orders.map((o) => o.order) ?? [],
      ),
    );
    for (const order of orderSet)
      for (const side of [false, true]) {
        for (const axis of axes) {
          const sum = new RiseSum();
          for (const m of matched) {
            const lm = m.log.motors.find((x) => x.motor === motor);
            const lo = lm?.orders.find((o) => o.order === order);
            const level = side ? lo?.sideDb?.[axis] : lo?.powerDb[axis];
            if (!lm || !lo || level === undefined || !Number.isFinite(level) || !(lm.meanRpm > 0))
              continue;
            if (!comparableOrder(range, order, (order * lm.meanRpm) / 60, RPM_SPREAD_MARGIN))
              continue;
            const bm = m.base.motors.find((x) => x.motor === motor);
            const bo =
              bm?.orders?.find((o) => o.order === order) ??
              (order === 1 && bm && !side
                ? { db: bm.order1Db, logSpreadDb: bm.logSpreadDb, blocks: 0 }
                : undefined);
            const logOld = isOldHalfOrder(order, lo.sideDb, axis);
            const expected = atThrottle(baseline, m.log.meanThrottle, (b) => {
              const x = b.motors.find((y) => y.motor === motor);
              const o = x?.orders?.find((y) => y.order === order);
              if (o && !Number.isInteger(order))
                return halfOrderExpected(o, axis, side, logOld) ?? Number.NaN;
              if (side) return o?.sideDb?.[axis] ?? Number.NaN;
              return o ? o.db[axis] : order === 1 && x ? x.order1Db[axis] : Number.NaN;
            });
            if (!bo || !Number.isFinite(expected)) continue;
            const nLog = Math.max(1, (lm.blocks ?? m.log.segments) - (lm.maskedBlocks ?? 0));
            const nBase = Math.max(1, bo.blocks || m.base.segments);
            const variance = medianVariance(nLog, nBase) + bo.logSpreadDb ** 2;
            sum.add(m.log.segments, level - expected, variance, lm.meanRpm / 60);
          }
          const standing = sum.standing({ motor, order, side, axis });
          if (standing) raw.push(standing);
        }
      }
  }
  return raw;
}

/**
 * Weighted sums of one motor order's rises over its baseline (per band or rpm bin): the mean rise,
 * the standard deviation of that mean from each part's variance, and the mean rotation rate.
 */
class RiseSum {
  private weight = 0;
  private rise = 0;
  private variance = 0;
  private rotation = 0;

  add(weight: number, riseDb: number, varianceDb2: number, rotationHz: number): void {
    this.weight += weight;
    this.rise += weight * riseDb;
    this.variance += weight * weight * varianceDb2;
    this.rotation += weight * rotationHz;
  }

  /** The standing, or null when nothing was added. */
  standing(key: Pick<RawStanding, "motor" | "order" | "side" | "axis">): RawStanding | null {
    const w = this.weight;
    if (!(w > 0)) return null;
    return {
      ...key,
      ownDb: this.rise / w,
      sigmaDb: Math.sqrt(this.variance) / w,
      rotationHz: this.rotation / w,
    };
  }
}

/** Variance, dB², of the difference of two medians of nLog and nBase noise-like block powers. */
function medianVariance(nLog: number, nBase: number): number {
  return (DB_PER_UNIT_LOG * MEDIAN_SCATTER) ** 2 * (1 / nLog + 1 / nBase);
}

/**
 * Analyses stored before half orders were measured exactly hold the strongest tone near a half
 * order as its level, and nothing beside it.
 */
function isOldHalfOrder(order: number, sideDb: Record<Axis, number> | undefined, axis: Axis) {
  return !Number.isInteger(order) && !Number.isFinite(sideDb?.[axis] ?? Number.NaN);
}

/**
 * What of a baseline band's half order the log's value is held against: where either side is of
 * the old kind (isOldHalfOrder), the strongest tone near the order against the strongest tone, and
 * the exact level not at all; otherwise like against like. Undefined when not comparable.
 */
function halfOrderExpected(
  o: { order: number; db: Record<Axis, number>; sideDb?: Record<Axis, number> },
  axis: Axis,
  side: boolean,
  logOld: boolean,
): number | undefined {
  const baseOld = isOldHalfOrder(o.order, o.sideDb, axis);
  if (side) return baseOld ? o.db[axis] : o.sideDb?.[axis];
  if (baseOld === logOld) return o.db[axis];
  // An old log's level is the strongest tone (the new baseline's sideDb); a new log's exact level
  // has nothing like it in an old baseline.
  return logOld ? o.sideDb?.[axis] : undefined;
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
 * NaN when it does not stand out.
 */
export function standsOut(
  s: OrderStanding,
  h: HealthThresholds,
  excessSigmaDb: (s: OrderStanding) => number,
): number {
  // A motor's imbalance or rattle shakes the whole airframe: its order rises over the other
  // motors on every axis it reaches. The rise over the others is judged as the mean over the
  // compared axes, whose scatter is the single axis's over √axes (the axes' wander taken as
  // independent), so a rise that every axis shares counts for more than one axis's alone.
  const excess = s.axesCompared > 0 ? s.axesExcessDb : s.excessDb;
  const sigma = excessSigmaDb(s) / Math.sqrt(Math.max(1, s.axesCompared));
  if (
    !Number.isFinite(excess) ||
    !(s.ownDb >= h.minSigma * s.sigmaDb) ||
    !(excess >= h.minSigma * sigma)
  )
    return Number.NaN;
  return Math.min(s.ownDb, excess) >= h.levelDb.watch ? s.ownDb : Number.NaN;
}

/**
 * The exact half orders (tones locked at k + ½ of the rotation, a loose part's sub-harmonics) of
 * a motor that rose over its own baseline on the whole airframe: the mean rise over the compared
 * axes reaches the watch step and minSigma of its expected scatter (the axes' scatters combined
 * as independent, as in standsOut), and exceeds the other motors' on the average. Asked only of a
 * motor that a whole order has already named: the question is then which fault it has, not
 * whether it has one, so the rise need not also clear the other motors' spread (which a half
 * order's leak into near-identical motors widens most: all motors' half orders lie within a few Hz).
 */
export function risenHalfOrders(
  standings: readonly OrderStanding[],
  motor: number,
  h: HealthThresholds,
): OrderStanding[] {
  const out: OrderStanding[] = [];
  const halves = standings.filter(
    (s) => s.motor === motor && !s.side && !Number.isInteger(s.order),
  );
  for (const order of new Set(halves.map((s) => s.order))) {
    const axes = halves.filter((s) => s.order === order);
    const first = axes[0];
    if (!first) continue;
    const rise = mean(axes.map((s) => s.ownDb));
    const sigma = Math.sqrt(axes.reduce((sum, s) => sum + s.sigmaDb ** 2, 0)) / axes.length;
    if (rise >= Math.max(h.levelDb.watch, h.minSigma * sigma) && first.axesExcessDb > 0)
      out.push(first);
  }
  return out;
}

/**
 * The scatter of the rises over the other motors, per order (and sidebands apart): the larger
 * of that order's robust spread over the other motors' axes and the spread over every order. An
 * order that the flight controller notches away is noise-like and wanders more than one that
 * stands clear, so each is judged by its own kind.
 *
 * The yardstick of a motor is made without it (leave-one-out, as in jackknife outlier tests):
 * the other motors' rises are taken over each other only, so the judged motor's standings enter
 * neither the spread nor the medians the spread is measured from. With it inside, a damaged
 * motor's rise moved the others' medians and its tone leaking into near-identical motors' orders
 * widened the very yardstick that damage was judged by. Where fewer than three motors remain to
 * be held against each other, the rise over the others is taken as it stands (every motor in).
 */
export function excessSigma(standings: readonly OrderStanding[]): (s: OrderStanding) => number {
  const all = robustSigma(standings.map((s) => s.excessDb));
  const pools = new Map<
    number,
    { pool: { x: OrderStanding; excessDb: number }[]; spread: number }
  >();
  const poolOf = (motor: number) => {
    let p = pools.get(motor);
    if (!p) {
      const others = standings.filter((x) => x.motor !== motor);
      const loo = others
        .map((x) => ({ x, excessDb: riseOverOthers(x, others) }))
        .filter((y) => Number.isFinite(y.excessDb));
      p =
        loo.length > 0
          ? { pool: loo, spread: robustSigma(loo.map((y) => y.excessDb)) }
          : { pool: others.map((x) => ({ x, excessDb: x.excessDb })), spread: all };
      pools.set(motor, p);
    }
    return p;
  };
  const perKey = new Map<string, number>();
  return (s) => {
    const key = `${s.motor}/${s.order}/${s.side}`;
    let sigma = perKey.get(key);
    if (sigma === undefined) {
      const { pool, spread } = poolOf(s.motor);
      const order = pool.filter((y) => y.x.order === s.order && y.x.side === s.side);
      // Too few other motors with this order (a robust sigma of nothing is NaN): the pool's
      // spread over every order is the yardstick.
      const own = order.length > 0 ? robustSigma(order.map((y) => y.excessDb)) : Number.NaN;
      sigma = Number.isFinite(own) ? Math.max(spread, own) : spread;
      perKey.set(key, sigma);
    }
    return sigma;
  };
}

/** A standing's rise over the median of the motors in `among` but itself, same order and axis; NaN when none. */
function riseOverOthers(s: OrderStanding, among: readonly OrderStanding[]): number {
  const ref = among
    .filter(
      (x) => x.motor !== s.motor && x.order === s.order && x.side === s.side && x.axis === s.axis,
    )
    .map((x) => x.ownDb);
  // One other motor is no median: its own wander is half of the difference.
  return ref.length >= 2 ? s.ownDb - median(ref) : Number.NaN;
}

/** The motor whose half orders (tones between its whole orders) rose most, against both references. */
function bearingMotor(
  standings: readonly OrderStanding[],
  h: HealthThresholds,
  excessSigmaDb: (s: OrderStanding) => number,
): OrderStanding | null {
  let best: { s: OrderStanding; magnitude: number } | null = null;
  for (const s of standings) {
    if (isWhole(s)) continue;
    const magnitude = standsOut(s, h, excessSigmaDb);
    if (Number.isFinite(magnitude) && (!best || magnitude > best.magnitude))
      best = { s, magnitude };
  }
  return best?.s ?? null;
}

/** The order itself, at a whole multiple of the rotation (not its sidebands, not a half order). */
export const isWhole = (s: OrderStanding) => Number.isInteger(s.order) && !s.side;

/** "sidebands of 2×", "1.5×" or "tones near 3.5×": a tone between a motor's whole orders, for the sentences. */
export const betweenName = (s: OrderStanding) =>
  !s.side
    ? `${s.order}×`
    : Number.isInteger(s.order)
      ? `sidebands of ${s.order}×`
      : `tones near ${s.order}×`;
