import "server-only";
import { DEFAULT_ANALYSIS } from "@/lib/analysis/settings";
import type { LogAnalysis } from "@/lib/analysis/types";
import type { Baseline } from "@/lib/health/baseline";
import type { Axis } from "@/lib/logs/columns";
import { toDb } from "@/lib/signal/bands";

/** One point of a spectrum chart: dB re 1 (deg/s)²/Hz of the log and of its baseline. */
export interface SpectrumPoint {
  freqHz: number;
  current?: number;
  baseline?: number;
}

/** Charts get at most this many points per axis; a pit laptop draws them quickly. */
const MAX_POINTS = 450;

/**
 * A log's spectrum against the baseline's, at matched throttle: both are averaged over
 * the throttle bands flown in both, weighted by the baseline's time in each, so that a harder or
 * gentler heat does not show as a difference. dB re 1 (deg/s)²/Hz.
 */
export function spectrumOverlay(
  analysis: LogAnalysis,
  axis: Axis,
  baseline: Baseline | undefined,
): SpectrumPoint[] {
  const binHz = analysis.settings.binHz;
  const lo = analysis.settings.minFreqHz;
  const hi = Math.min(analysis.settings.maxFreqHz, baseline?.maxFreqHz ?? Infinity);
  const first = Math.ceil(lo / binHz);
  const last = Math.floor(hi / binHz);
  const step = Math.max(1, Math.ceil((last - first) / MAX_POINTS));
  const pairs = baseline
    ? baseline.throttleBands.flatMap((b) => {
        const mine = analysis.throttleBands.find(
          (x) => x.index === b.index && x.segments >= DEFAULT_ANALYSIS.minBandSegments,
        );
        return mine
          ? [{ weight: b.segments, log: mine.axes[axis].psdDb, base: b.axes[axis].psdDb }]
          : [];
      })
    : [];
  const total = pairs.reduce((s, p) => s + p.weight, 0);
  const mean = (pick: (p: (typeof pairs)[number]) => number[], k: number) =>
    toDb(pairs.reduce((s, p) => s + (p.weight / total) * 10 ** ((pick(p)[k] ?? -300) / 10), 0));
  const psd = analysis.axes[axis].psd;
  const points: SpectrumPoint[] = [];
  for (let k = first; k <= last; k += step) {
    // The largest value in each group keeps narrow peaks visible when points are thinned.
    let cur = -Infinity;
    for (let j = k; j < Math.min(k + step, last + 1); j++)
      cur = Math.max(cur, total > 0 ? mean((p) => p.log, j) : toDb(psd[j] ?? 0));
    const f = k * binHz;
    const point: SpectrumPoint = {
      freqHz: Math.round(f * 10) / 10,
      current: Math.round(cur * 100) / 100,
    };
    if (baseline && total > 0) {
      const bk = Math.round(f / baseline.binHz);
      let b = -Infinity;
      for (let j = bk; j < bk + step; j++)
        b = Math.max(
          b,
          mean((p) => p.base, j),
        );
      point.baseline = Math.round(b * 100) / 100;
    }
    points.push(point);
  }
  return points;
}
