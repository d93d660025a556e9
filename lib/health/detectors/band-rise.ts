import type { Axis } from "../../logs/columns";
import { round, weightedMean } from "../../signal/stats";
import type { Finding } from "../findings";
import { ADVICE } from "./advice";
import type { DetectorContext } from "./context";
import { atThrottle, graded } from "./shared";

/** A resonance that moved or appeared lifts its skirts too: it explains bands within ±40 % of it. */
const SKIRT = { below: 0.6, above: 1.4 };
/**
 * A band starting above this share of the floor corner is the floor's: a floor rise explains it,
 * and its advice is the bearings' and props'.
 */
const HIGH_BAND_CORNER_SHARE = 0.9;
/** Segment-to-segment spread of a band level assumed when the baseline has none, dB. */
const DEFAULT_SEGMENT_SPREAD_DB = 1;

/**
 * An analysis band's level at matched throttle, log against baseline (interpolated to each log
 * band's mean throttle), beyond minSigma of its expected scatter: the segments' spread over the
 * log's and the baseline's segment counts, and the baseline logs' spread. Run last: a band that a
 * more specific finding already explains is not reported.
 */
export function bandRises(ctx: DetectorContext): Finding[] {
  const { log, baseline, thresholds: h, axes, matched, found: specific } = ctx;
  const risen: { band: (typeof baseline.bands)[number]; axis: Axis; delta: number }[] = [];
  const hasFloorRise = specific.some((f) => f.kind === "floor-rise");
  const highFromHz = ctx.cornerHz * HIGH_BAND_CORNER_SHARE;
  baseline.bands.forEach((band, b) => {
    // A more specific finding inside the band already explains its rise.
    const explained =
      specific.some(
        (f) =>
          (f.kind === "mode-shift" || f.kind === "mode-lost" || f.kind === "new-peak") &&
          band.hiHz > SKIRT.below * f.freqHz &&
          band.loHz < SKIRT.above * f.freqHz,
      ) ||
      specific.some(
        (f) =>
          f.kind === "motor-order" &&
          matched.some((m) =>
            (m.log.motors.find((x) => x.motor === f.motor)?.orders ?? [])
              // Every order that rose explains its band; a rattling motor's tones between its
              // orders too (f.orders lists whole orders only).
              .filter(
                (o) =>
                  (f.orders ?? [f.order ?? 1]).includes(o.order) ||
                  (f.cause === "motor-mount" && !Number.isInteger(o.order)),
              )
              .some((o) => o.freqHz >= band.loHz && o.freqHz < band.hiHz),
          ),
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
        const seg = m.base.axes[axis].segmentSpreadDb[b] ?? DEFAULT_SEGMENT_SPREAD_DB;
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
    if (best) risen.push({ band, ...best });
  });
  // With a floor rise, the run of risen bands reaching down from the floor's range, band after
  // adjacent band, is the same broadband noise seen lower (a worn bearing's noise is broad and
  // the corner is a convention): the floor rise says it once.
  let broadFromHz = highFromHz;
  if (hasFloorRise)
    for (const r of [...risen].sort((a, b) => b.band.hiHz - a.band.hiHz)) {
      if (r.band.loHz >= highFromHz) continue;
      if (r.band.hiHz < broadFromHz || !(r.delta >= h.levelDb.watch)) break;
      broadFromHz = r.band.loHz;
    }
  const found: Finding[] = [];
  for (const { band, axis, delta } of risen) {
    if (hasFloorRise && band.loHz >= broadFromHz) continue;
    const grade = graded(delta, h.levelDb, h);
    if (!grade) continue;
    const advice = band.loHz >= highFromHz ? ADVICE.highBand : ADVICE.lowBand;
    found.push({
      axis,
      kind: "band-rise",
      freqHz: round(Math.sqrt(band.loHz * band.hiHz), 0),
      deltaDb: round(delta, 1),
      ...grade,
      text: `${axis} vibration between ${band.loHz} and ${band.hiHz} Hz is up ${delta.toFixed(0)} dB at matched throttle: ${advice}`,
    });
  }
  return found;
}
