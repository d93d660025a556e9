import type { Axis } from "../../logs/columns";
import { round, weightedMean } from "../../signal/stats";
import { peaksAboveLocalMedian } from "../../signal/peaks";
import { dbAt, MODE_TRACK_PROMINENCE_DB, type BaselineMode } from "../baseline";
import type { Finding } from "../findings";
import { ADVICE } from "./advice";
import type { DetectorContext } from "./context";
import { graded, wholeOrderFreqs } from "./shared";

/** Where a baseline mode is looked for: −30 % to +15 % of its frequency (a crack lowers a mode). */
export const MODE_SEARCH = { below: 0.7, above: 1.15 };
/**
 * A peak this close to the mode (fraction of its frequency) is the mode even on a motor order.
 * Leaving out every sighting on an order when some band saw the mode clear of one was tried: a
 * crack's lowered mode was then judged by other peaks of the bands clear of an order (one
 * airframe's crack reported 10 % above its frequency at every log rate; the validation's
 * strongest-severity cases not fully right rose from 19 to 23).
 */
export const ON_MODE_FRACTION = 0.03;
/** A peak this close to a motor's whole order (fraction of the peak's frequency) is that order. */
const ON_ORDER_FRACTION = 0.03;
/**
 * Cost of pairing a peak with a mode: 5 % of frequency away costs one unit; every 6 dB (up to
 * 12) of the peak's prominence, and of its rise over the baseline's level at that frequency in
 * the same band, earns one back, and every 6 dB (up to 12) it stands below the mode's own level
 * in the baseline's band costs one more. A mode is the dominant peak near where it was, where it
 * moved to the log stands above the baseline, and at the same throttle it keeps about its level:
 * a crack that lowers it by 8–15 % leaves it the strongest peak around, while a bump closer to
 * the old frequency but far weaker than the mode ever was is its skirt, an order or noise.
 */
const PAIRING_COST = { logFrequency: 0.05, perDb: 6, maxDb: 12 };

const clamp = (db: number, max: number) =>
  Number.isFinite(db) ? Math.min(max, Math.max(0, db)) : 0;
/** A mode is lost only when it was expected in at least this many compared bands. */
const MIN_BANDS_FOR_LOST = 2;
/** A rise counts half: a frame does not stiffen by itself (see below). */
const RISE_WEIGHT = 0.5;
/** Half the baseline's own scatter of the mode is forgiven. */
const SPREAD_WEIGHT = 0.5;

export interface Sighting {
  shift: number;
  freqHz: number;
  weight: number;
}

/**
 * Each baseline mode followed into the log, throttle band by throttle band: in every compared
 * band where the baseline shows the mode, the log's band spectrum is searched from −30 % to
 * +15 % of the baseline's frequency there for a peak above the local median (a lower gate than
 * for new peaks, and no analysis band limits the search, so a mode may move out of its band).
 * The shift is the segment-weighted mean over the bands where both have it. A mode that every
 * baseline log had and that the log shows in none of the compared bands is lost.
 */
export function modeShifts(ctx: DetectorContext): Finding[] {
  const out: Finding[] = [];
  for (const axis of ctx.axes) {
    const modes = ctx.baseline.modes.filter(
      (m) => m.axis === axis && m.freqHz * MODE_SEARCH.above <= ctx.maxHz,
    );
    const { sightings, expected } = sightingsOf(ctx, axis, modes);
    for (const m of modes) {
      const seen = sightings.get(m) ?? [];
      const finding =
        seen.length === 0 ? modeLost(ctx, m, expected.get(m) ?? 0) : modeShift(ctx, m, seen);
      if (finding) out.push(finding);
    }
  }
  return out;
}

/**
 * Where each mode was seen, band by band, and in how many compared bands the baseline expected
 * it: the log's peaks near the mode's frequency in that band, paired greedily by cost.
 */
function sightingsOf(ctx: DetectorContext, axis: Axis, modes: readonly BaselineMode[]) {
  const binHz = ctx.log.settings.binHz;
  const sightings = new Map<BaselineMode, Sighting[]>();
  const expected = new Map<BaselineMode, number>();
  for (const band of ctx.matched) {
    const psd = band.log.axes[axis].psdDb;
    // Where each mode is expected in this band, and the candidates around it.
    const wanted = modes.flatMap((m) => {
      const inBand = m.bands
        ? m.bands.find((b) => b.index === band.base.index)
        : { freqHz: m.freqHz, levelDb: m.levelDb };
      return inBand ? [{ m, f: inBand.freqHz, level: inBand.levelDb }] : [];
    });
    for (const w of wanted) expected.set(w.m, (expected.get(w.m) ?? 0) + 1);
    const orderFreqs = wholeOrderFreqs(band.log);
    const basePsd = band.base.axes[axis].psdDb;
    const pairs = wanted.flatMap((w) => {
      const lo = w.f * MODE_SEARCH.below;
      const hi = w.f * MODE_SEARCH.above;
      // The baseline's band spectrum is flown at the same throttle, so its motors' orders sit
      // where the log's do: a peak it shows too near an order is that order.
      const basePeaks = peaksAboveLocalMedian(
        basePsd,
        ctx.baseline.binHz,
        lo,
        hi,
        MODE_TRACK_PROMINENCE_DB,
      );
      return (
        peaksAboveLocalMedian(psd, binHz, lo, hi, MODE_TRACK_PROMINENCE_DB)
          // A peak away from the mode that sits on a motor order in this band, where the
          // baseline also has a peak, is that order, not the moved mode (an order passing right
          // over the mode cannot be told from it). A peak on an order that the baseline lacks
          // is new in this log, and the mode that moved is what is new.
          .filter(
            (p) =>
              Math.abs(p.freqHz - w.f) <= ON_MODE_FRACTION * w.f ||
              !orderFreqs.some((f) => Math.abs(f - p.freqHz) <= ON_ORDER_FRACTION * p.freqHz) ||
              !basePeaks.some((b) => Math.abs(b.freqHz - p.freqHz) <= ON_ORDER_FRACTION * p.freqHz),
          )
          // Greedy assignment by cost (relative frequency distance less prominence), each peak
          // to one mode only.
          .map((p) => ({
            w,
            p,
            cost:
              Math.abs(Math.log(p.freqHz / w.f)) / PAIRING_COST.logFrequency -
              clamp(p.prominenceDb, PAIRING_COST.maxDb) / PAIRING_COST.perDb -
              clamp(p.levelDb - dbAt(basePsd, ctx.baseline.binHz, p.freqHz), PAIRING_COST.maxDb) /
                PAIRING_COST.perDb +
              clamp(w.level - p.levelDb, PAIRING_COST.maxDb) / PAIRING_COST.perDb,
          }))
      );
    });
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
  return { sightings, expected };
}

/** A mode seen in the log: its segment-weighted shift, graded (a rise only ever to watch). */
export function modeShift(
  ctx: DetectorContext,
  m: BaselineMode,
  seen: readonly Sighting[],
): Finding | null {
  const h = ctx.thresholds;
  const weights = seen.map((x) => x.weight);
  // Rounded to a millionth of a percent, so that a shift exactly at a step is graded at it
  // whatever the order of the floating-point sums.
  const shiftPct = round(
    weightedMean(
      seen.map((x) => x.shift),
      weights,
    ) * 100,
    6,
  );
  const nowHz = weightedMean(
    seen.map((x) => x.freqHz),
    weights,
  );
  // The baseline's own scatter of this mode is not held against the log.
  // A frame does not stiffen by itself: a rise is most often a peak estimate wobbling on a broad
  // mode, so it counts half.
  const magnitude =
    (shiftPct < 0 ? -shiftPct : shiftPct * RISE_WEIGHT) - m.spreadPct * SPREAD_WEIGHT;
  const grade = graded(magnitude, h.modeShiftPct, h);
  if (!grade) return null;
  const dropped = shiftPct < 0;
  const drop = -shiftPct / 100;
  // f ∝ √(k/m): the stiffness left is the square of the frequency ratio.
  const stiffnessLoss = (1 - (1 - drop) ** 2) * 100;
  const text = dropped
    ? `${m.axis} mode at ${Math.round(m.freqHz)} Hz dropped ${Math.abs(shiftPct).toFixed(0)} % since baseline (now ${Math.round(nowHz)} Hz): about ${stiffnessLoss.toFixed(0)} % less stiffness. ${ADVICE.modeDropped}`
    : `${m.axis} mode at ${Math.round(m.freqHz)} Hz rose ${shiftPct.toFixed(0)} % since baseline (now ${Math.round(nowHz)} Hz): the frame is stiffer or lighter than it was. ${ADVICE.modeRose}`;
  // A stiffer frame is a change to note, not a danger.
  return {
    axis: m.axis,
    kind: "mode-shift",
    freqHz: round(nowHz, 1),
    baselineFreqHz: round(m.freqHz, 1),
    shiftPct: round(shiftPct, 1),
    severity: dropped ? grade.severity : "watch",
    points: dropped ? grade.points : Math.min(grade.points, h.penalty.watch),
    text,
  };
}

/**
 * A mode nowhere in sight. Only a mode the baseline always had, expected in at least two compared
 * bands, is missed; anything less could be the baseline's luck. It is graded as a drop of the
 * inspect step.
 */
function modeLost(ctx: DetectorContext, m: BaselineMode, bandsExpected: number): Finding | null {
  const h = ctx.thresholds;
  if (m.seenIn < ctx.baseline.logs || bandsExpected < MIN_BANDS_FOR_LOST) return null;
  const grade = graded(h.modeShiftPct.inspect, h.modeShiftPct, h);
  if (!grade) return null;
  return {
    axis: m.axis,
    kind: "mode-lost",
    freqHz: round(m.freqHz, 1),
    baselineFreqHz: round(m.freqHz, 1),
    ...grade,
    text: `${m.axis} mode at ${Math.round(m.freqHz)} Hz, in every baseline log, is gone: no peak from ${Math.round(m.freqHz * MODE_SEARCH.below)} to ${Math.round(m.freqHz * MODE_SEARCH.above)} Hz in any compared throttle band. ${ADVICE.modeLost}`,
  };
}

/**
 * One mode-shift finding per baseline mode and axis: where the tracking followed a mode part of
 * the way down and the new-peak search found it further down (a peak below a mode that left its
 * place), the deeper drop is the mode's; the other is dropped. Other findings pass unchanged.
 */
export function deepestDropPerMode(findings: readonly Finding[]): Finding[] {
  const key = (f: Finding) => `${f.axis}/${f.baselineFreqHz ?? f.freqHz}`;
  const deepest = new Map<string, Finding>();
  for (const f of findings) {
    if (f.kind !== "mode-shift") continue;
    const old = deepest.get(key(f));
    if (!old || (f.shiftPct ?? 0) < (old.shiftPct ?? 0)) deepest.set(key(f), f);
  }
  return findings.filter((f) => f.kind !== "mode-shift" || deepest.get(key(f)) === f);
}
