import { AXES, type Axis } from "../../logs/columns";
import { peaksAboveLocalMedian } from "../../signal/peaks";
import { median, round } from "../../signal/stats";
import { dbAt, MODE_TRACK_PROMINENCE_DB } from "../baseline";
import type { Finding } from "../findings";
import { ADVICE } from "./advice";
import type { DetectorContext } from "./context";
import { DB_PER_UNIT_LOG, graded, robustSigma, wholeOrderFreqs } from "./shared";

/** Fewer bins than this between the lowest and highest frequency: nothing to search. */
const MIN_SPAN_BINS = 3;
/** The motors of one airframe spin this far apart (fraction of an order's frequency). */
const MOTOR_SPREAD_FRACTION = 0.02;
/** A bin that less than this share of the segments could judge is left out. */
const MIN_JUDGED_SHARE = 0.5;
/** The local level of the excess: its median over ±15 % of the bin's frequency, ±3 bins at least. */
const LOCAL_WINDOW = { fraction: 0.15, minBins: 3 };
/** The wander a peak is judged by: the local excess's spread over ±30 % of its frequency. */
const WANDER_FRACTION = 0.3;
/**
 * A mode that moved drags its skirt along: from this share below the lower of its old and new
 * frequencies to this share above the higher, a peak is that mode's, not a new one.
 */
const MOVED_MODE_SKIRT = { below: 0.9, above: 1.05 };

/**
 * New resonances, seen wherever they fall: per compared throttle band and bin, the log's band
 * spectrum less the baseline's there, judged against the scatter expected of it — the Welch
 * estimate of K segments scatters about 4.34/√K dB per bin (χ² with 2K degrees of freedom;
 * Welch 1967), in the log and in the baseline, plus the baseline logs' own spread at that bin.
 * The excess is averaged over the bands (weighted by segments); where the log shows a peak above
 * its local median, an excess at least the watch step and minSigma expected deviations up, that
 * stands minSigma robust deviations above the excess around it, and that recurs in at least half
 * of the bands judging it, is a new peak. Bins near a motor's whole orders in a band (orders move with
 * throttle and have their own finding), near a moved or lost mode (`ctx.found`), or at a known
 * (recurring) baseline peak are not counted. With a floor rise among `ctx.found`, broadband noise
 * above the corner lifts every peak up there: the floor rise says it once.
 */
export function newPeaks(ctx: DetectorContext): Finding[] {
  const { log, baseline, thresholds: h, axes, maxHz } = ctx;
  const binHz = log.settings.binHz;
  const bins = { first: Math.ceil(baseline.minFreqHz / binHz), last: Math.floor(maxHz / binHz) };
  if (bins.last - bins.first < MIN_SPAN_BINS) return [];
  const found: Finding[] = [];
  for (const axis of axes) {
    const x = excessOver(ctx, axis, bins);
    const local = localExcess(x.excess, bins);
    // How this flight's spectrum wanders from the baseline's, bin to bin, around its own local
    // level: the robust spread of the local excess near the bin (within ±WANDER_FRACTION of its
    // frequency). A new resonance is an outlier of it; the theoretical scatter alone
    // underestimates a real flight's, and prop wash makes the low range wander far more than the
    // high one, so one spread for the whole axis would pass the wash's bumps as peaks.
    const wanderAt = localWander(local, bins);
    const tonal = peaksAboveLocalMedian(
      x.logDb,
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
        const e = x.excess[k] ?? Number.NaN;
        if (Number.isFinite(e) && !(e <= best)) {
          best = e;
          at = k;
        }
      }
      const s = x.sigma[at] ?? Number.NaN;
      const above = local[at] ?? Number.NaN;
      if (
        !Number.isFinite(best) ||
        !(best >= h.minSigma * s) ||
        !(above >= h.minSigma * wanderAt(at)) ||
        !(above >= h.levelDb.watch)
      )
        continue;
      // A resonance stays put across throttle: it must be up in at least half of the bands that
      // judged the bin (and two of them, when two or more did), not only on average.
      const bands = x.judged[at] ?? 0;
      if (!((x.risen[at] ?? 0) >= Math.max(Math.min(2, bands), Math.ceil(bands / 2)))) continue;
      if (isKnown(ctx, p.freqHz)) continue;
      const grade = graded(best, h.levelDb, h);
      if (!grade) continue;
      found.push({
        axis,
        kind: "new-peak",
        freqHz: round(p.freqHz, 1),
        deltaDb: round(best, 1),
        ...grade,
        text: `new ${axis} peak at ${Math.round(p.freqHz)} Hz, ${best.toFixed(0)} dB above the baseline there: something has come loose or is touching. ${ADVICE.newPeak}`,
      });
    }
  }
  // One loose part shows on several axes: keep the strongest sighting of each frequency.
  const floorRise = ctx.found.some((f) => f.kind === "floor-rise");
  return keepStrongestPerFrequency(found, h.samePeakFraction).filter(
    (f) => !(floorRise && f.freqHz >= baseline.floorCornerHz),
  );
}

interface BinRange {
  first: number;
  last: number;
}

/** One axis's excess over the baseline per bin, averaged over the compared bands. */
interface Excess {
  /** Segment-weighted mean of log − baseline, dB (NaN where most bands could not judge). */
  excess: Float64Array;
  /** Its expected standard deviation, dB. */
  sigma: Float64Array;
  /** The log's own band spectra, segment-weighted, dB. */
  logDb: Float64Array;
  /** Per bin: the bands that judged it, and those that saw the watch step's excess there. */
  judged: Float64Array;
  risen: Float64Array;
}

function excessOver(ctx: DetectorContext, axis: Axis, { first, last }: BinRange): Excess {
  const { baseline, thresholds: h, matched } = ctx;
  const binHz = ctx.log.settings.binHz;
  const sum = new Float64Array(last + 1);
  const wsum = new Float64Array(last + 1);
  const var2 = new Float64Array(last + 1);
  const logSum = new Float64Array(last + 1);
  const judged = new Float64Array(last + 1);
  const risen = new Float64Array(last + 1);
  for (const m of matched) {
    const orderFreqs = wholeOrderFreqs(m.log);
    // Within a throttle band each order sweeps as rpm does, rpm ∝ √throttle (thrust ∝ rpm²):
    // a half-width of (√hi − √lo)/(√hi + √lo) around its mean, and 2 % for the motors' spread.
    const sweep =
      (Math.sqrt(m.log.hi) - Math.sqrt(m.log.lo)) / (Math.sqrt(m.log.hi) + Math.sqrt(m.log.lo)) +
      MOTOR_SPREAD_FRACTION;
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
    if (w < MIN_JUDGED_SHARE * total) continue;
    excess[k] = (sum[k] ?? 0) / w;
    sigma[k] = Math.sqrt(var2[k] ?? 0) / w;
  }
  return { excess, sigma, logDb, judged, risen };
}

/** The excess less its running median: a broadband rise is the floor's and the bands' finding. */
function localExcess(excess: Float64Array, { first, last }: BinRange): Float64Array {
  const local = new Float64Array(last + 1).fill(Number.NaN);
  for (let k = first; k <= last; k++) {
    const e = excess[k] ?? Number.NaN;
    if (!Number.isFinite(e)) continue;
    const half = Math.max(LOCAL_WINDOW.minBins, Math.round(LOCAL_WINDOW.fraction * k));
    const around: number[] = [];
    for (let j = Math.max(first, k - half); j <= Math.min(last, k + half); j++) {
      const v = excess[j] ?? Number.NaN;
      if (Number.isFinite(v)) around.push(v);
    }
    local[k] = e - median(around);
  }
  return local;
}

/** The robust spread of the local excess within ±WANDER_FRACTION of a bin's frequency, by bin. */
function localWander(local: Float64Array, { first, last }: BinRange): (bin: number) => number {
  const cache = new Map<number, number>();
  return (k) => {
    let w = cache.get(k);
    if (w === undefined) {
      const half = Math.max(LOCAL_WINDOW.minBins, Math.round(WANDER_FRACTION * k));
      w = robustSigma(
        Array.from(local.subarray(Math.max(first, k - half), Math.min(last, k + half) + 1)),
      );
      cache.set(k, w);
    }
    return w;
  };
}

/**
 * A frame mode shows on every axis it couples into: a known peak or mode of any axis, or a mode
 * that moved or was lost (found before), is not new on this one (it may still be a band rise).
 */
function isKnown(ctx: DetectorContext, freqHz: number): boolean {
  const { baseline } = ctx;
  const near = (f: number) => Math.abs(f - freqHz) <= ctx.thresholds.samePeakFraction * freqHz;
  return (
    AXES.some((x) => baseline.peaks[x].some(near)) ||
    baseline.modes.some((m) => near(m.freqHz)) ||
    ctx.found.some((x) => {
      if (x.kind !== "mode-shift" && x.kind !== "mode-lost") return false;
      const was = x.baselineFreqHz ?? x.freqHz;
      return (
        near(x.freqHz) ||
        near(was) ||
        (freqHz >= MOVED_MODE_SKIRT.below * Math.min(was, x.freqHz) &&
          freqHz <= MOVED_MODE_SKIRT.above * Math.max(was, x.freqHz))
      );
    })
  );
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
