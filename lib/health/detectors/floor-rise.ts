import { median, round, weightedMean } from "../../signal/stats";
import type { Finding } from "../findings";
import { motorNamed } from "../motor-positions";
import { ADVICE } from "./advice";
import type { DetectorContext } from "./context";
import { betweenName } from "./order-evidence";
import { graded, inAnOrderSpan, orderSpans, wholeOrderTrueFreqs, type OrderSpan } from "./shared";

/**
 * The band-to-band scatter of the floor's rise over √bands, its standard deviation at least
 * MIN_BAND_SCATTER_DB (with one band, or bands that agree to the hundredth, nothing says the
 * rise is steadier than that).
 */
function standardError(deltas: readonly number[], mean: number): number {
  // Deviations from the segment-weighted mean that is graded (stdDev's would be from the plain mean).
  const finite = deltas.filter(Number.isFinite);
  const n = finite.length;
  const variance = n > 1 ? finite.reduce((s, d) => s + (d - mean) ** 2, 0) / (n - 1) : 0;
  return Math.max(MIN_BAND_SCATTER_DB, Math.sqrt(variance)) / Math.sqrt(Math.max(1, n));
}

const MIN_BAND_SCATTER_DB = 1;

/**
 * Median of a dB spectrum over [loHz, hiHz] between the motor orders' spans: the noise floor
 * there. Where the orders cover more than MAX_ORDER_SHARE of the range (a 1 kHz log's octave
 * above its corner holds the 1× and the folded 2× of four motors), the median over every bin.
 */
export function floorOver(
  psdDb: readonly number[],
  binHz: number,
  loHz: number,
  hiHz: number,
  orders: readonly OrderSpan[],
): number {
  const first = Math.ceil(loHz / binHz);
  const last = Math.min(psdDb.length - 1, Math.floor(hiHz / binHz));
  const all = psdDb.slice(first, last + 1);
  const between = all.filter((_, i) => !inAnOrderSpan(orders, (first + i) * binHz));
  return median(between.length >= (1 - MAX_ORDER_SHARE) * all.length ? between : all);
}

/** Orders may cover at most this share of the floor's range for the floor to be read between them. */
const MAX_ORDER_SHARE = 2 / 3;

/**
 * The floor is judged over one octave above the corner (up to the top both logs show). The
 * flight controller's low-passes (corners of some 100–300 Hz, two stages; common practice) leave
 * the logged gyro above about a kilohertz to the sensor's own noise, where no vibration can rise:
 * a median that reached up there would read a worn bearing smaller in an 8 kHz log than in a
 * 1 kHz one.
 */
const FLOOR_SPAN = 2;

/** Top of the range the floor rise is judged over, Hz. */
function floorTop(ctx: Pick<DetectorContext, "cornerHz" | "maxHz">): number {
  return Math.min(ctx.maxHz, FLOOR_SPAN * ctx.cornerHz);
}

/**
 * Broadband noise above the floor corner, log against baseline over the same range (the
 * baseline's corner, lowered like the analysis does for a log that cannot reach it, over the
 * octave above it), segment-weighted over the compared bands; the axis that rose most is reported,
 * the others that reached the watch step are named.
 */
export function floorRises(ctx: DetectorContext): Finding[] {
  const { log, baseline, thresholds: h, axes, matched, cornerHz } = ctx;
  const maxHz = floorTop(ctx);
  if (cornerHz >= maxHz) return [];
  const perAxis = axes
    .map((axis) => {
      // The same spans on both sides: the baseline's band is flown at the same throttle, so its
      // orders sit where the log's do. A bent prop's tones sweeping over the range are not
      // broadband noise.
      const deltas = matched.map((m) => {
        const orders = orderSpans(
          m.log,
          wholeOrderTrueFreqs(m.log, log.sampleRateHz),
          log.sampleRateHz,
        );
        return (
          floorOver(m.log.axes[axis].psdDb, log.settings.binHz, cornerHz, maxHz, orders) -
          floorOver(m.base.axes[axis].psdDb, baseline.binHz, cornerHz, maxHz, orders)
        );
      });
      const delta = weightedMean(
        deltas,
        matched.map((m) => m.log.segments),
      );
      return { axis, delta, error: standardError(deltas, delta) };
    })
    // A worn bearing or a damaged prop is noisy at every throttle: the rise must stand minSigma
    // standard errors clear of how it varies from band to band. Hard flying lifts the floor in
    // some bands (prop wash, manoeuvres), not in all.
    .filter((x) => Number.isFinite(x.delta) && x.delta >= h.minSigma * x.error);
  perAxis.sort((a, b) => b.delta - a.delta);
  const top = perAxis[0];
  if (!top) return [];
  const grade = graded(top.delta, h.levelDb, h);
  if (!grade) return [];
  const others = perAxis
    .slice(1)
    .filter((x) => x.delta >= h.levelDb.watch)
    .map((x) => x.axis);
  const also = others.length > 0 ? ` (also ${others.join(" and ")})` : "";
  const centre = Math.sqrt(cornerHz * maxHz);
  // A worn bearing rings at its motor's non-integer orders: the motor whose half orders rose
  // against its own baseline and the other motors is the one to check first.
  const bearing = ctx.orders.bearing;
  const measured = `broadband noise from ${Math.round(cornerHz)} to ${Math.round(maxHz)} Hz is up ${top.delta.toFixed(0)} dB on ${top.axis}${also}`;
  return [
    {
      axis: top.axis,
      kind: "floor-rise",
      freqHz: round(centre, 0),
      deltaDb: round(top.delta, 1),
      ...(bearing ? { motor: bearing.motor, order: bearing.order } : {}),
      ...grade,
      text: bearing
        ? `${measured}, with tones between the whole orders of ${motorNamed(bearing.motor, ctx.positions)} (${betweenName(bearing)} its rotation up ${bearing.ownDb.toFixed(0)} dB): ${ADVICE.bearingOfMotor}`
        : `${measured}${BEARINGS_OR_PROPS}`,
    },
  ];
}

/** The end of a floor rise's sentence when no motor is named. */
const BEARINGS_OR_PROPS = `: ${ADVICE.bearingsOrProps}`;

/**
 * A floor rise that comes with two or more modes dropped (by the mode tracking or the new-peak
 * search, which reports a mode that left its place) is the frame gone soft rather than a bearing:
 * loose frame screws lower every mode and damp it, and a damped mode's skirt spreads its vibration
 * over the octave above it. Its points stay, its sentence points at the frame. A motor named by
 * its own tones still comes first.
 */
export function softFrameFloor(findings: readonly Finding[], sameFraction: number): Finding[] {
  // One mode seen on two axes (a roll and a pitch peak a few hertz apart) is one mode.
  const modes: number[] = [];
  for (const f of findings) {
    if (f.kind !== "mode-shift" || !((f.shiftPct ?? 0) < 0)) continue;
    const at = f.baselineFreqHz ?? f.freqHz;
    if (!modes.some((m) => Math.abs(m - at) <= sameFraction * at)) modes.push(at);
  }
  const dropped = modes.length;
  if (dropped < 2) return [...findings];
  return findings.map((f) =>
    f.kind === "floor-rise" && f.motor === undefined && f.text.endsWith(BEARINGS_OR_PROPS)
      ? {
          ...f,
          cause: "frame",
          text: `${f.text.slice(0, -BEARINGS_OR_PROPS.length)}, with ${dropped} frame modes lower at the same time: ${ADVICE.softFrame}`,
        }
      : f,
  );
}
