import { DEFAULT_ANALYSIS } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import { AXES, type Axis } from "../logs/columns";
import type { Baseline } from "./baseline";

/**
 * One log's place on an airframe's trend lines, against its baseline: how far each baseline mode
 * has moved (percent of its baseline frequency) and, per axis, the largest rise of an analysis
 * band's level at matched throttle (dB, averaged over the throttle bands both flew, weighted by
 * the baseline's time in each). Pure; the airframe screen draws these over the flight dates.
 */

/** A baseline mode is looked for this far either side in later logs (fraction of its frequency). */
const MODE_WINDOW_FRACTION = 0.15;

export interface TrendPoint {
  /** Keyed by modeKey(mode): percent shift, null when the log shows no peak near it. */
  modeShiftPct: Record<string, number | null>;
  /** Largest band rise at matched throttle, dB, per axis; null when no throttle band matched. */
  bandRiseDb: Record<Axis, number | null>;
}

/** "pitch 238 Hz": how a baseline mode is named on the trend chart. */
export function modeKey(mode: { axis: Axis; freqHz: number }): string {
  return `${mode.axis} ${Math.round(mode.freqHz)} Hz`;
}

export function trendPoint(analysis: LogAnalysis, baseline: Baseline): TrendPoint {
  const modeShiftPct: Record<string, number | null> = {};
  for (const mode of baseline.modes) {
    const window = MODE_WINDOW_FRACTION * mode.freqHz;
    let best: number | null = null;
    for (const p of analysis.axes[mode.axis].peaks) {
      if (
        Math.abs(p.freqHz - mode.freqHz) <= window &&
        (best === null || Math.abs(p.freqHz - mode.freqHz) < Math.abs(best - mode.freqHz))
      )
        best = p.freqHz;
    }
    modeShiftPct[modeKey(mode)] =
      best === null ? null : Math.round(((best - mode.freqHz) / mode.freqHz) * 1000) / 10;
  }
  const bandRiseDb = { roll: null, pitch: null, yaw: null } as Record<Axis, number | null>;
  const pairs = baseline.throttleBands.flatMap((b) => {
    const mine = analysis.throttleBands.find(
      (x) => x.index === b.index && x.segments >= DEFAULT_ANALYSIS.minBandSegments,
    );
    return mine ? [{ weight: b.segments, log: mine, base: b }] : [];
  });
  const total = pairs.reduce((s, p) => s + p.weight, 0);
  if (total > 0) {
    for (const axis of AXES) {
      let worst = -Infinity;
      for (let i = 0; i < baseline.bands.length; i++) {
        let delta = 0;
        for (const p of pairs)
          delta +=
            (p.weight / total) *
            ((p.log.axes[axis].bandDb[i] ?? Number.NaN) -
              (p.base.axes[axis].bandDb[i] ?? Number.NaN));
        if (Number.isFinite(delta)) worst = Math.max(worst, delta);
      }
      bandRiseDb[axis] = Number.isFinite(worst) ? Math.round(worst * 10) / 10 : null;
    }
  }
  return { modeShiftPct, bandRiseDb };
}
