import { LogFormatError } from "../errors";
import type { LogInfo, ReadSummary } from "../logs/read-log";
import { bandBins, type FrequencyBand } from "../signal/bands";
import type { PeakSearch } from "../signal/peaks";
import { SegmentPeriodogram, defaultNperseg, resolveWelchOptions } from "../signal/welch";
import {
  USABLE_NYQUIST_FRACTION,
  bandsBelow,
  floorCorner,
  trackedOrders,
  welchOptionsOf,
  type AnalysisSettings,
} from "./settings";
import type { OrderLevel } from "./types";

/** One tracked motor order and its name in the results. */
export interface TrackedOrder {
  order: number;
  label: OrderLevel["label"];
}

/**
 * Everything about one log's analysis that follows from its header and the settings, fixed before
 * the first sample: the Welch segment, the bands below the trusted top, the throttle bands, the
 * tracked orders. Built once in {@link planAnalysis}; never changed.
 */
export interface AnalysisPlan {
  readonly settings: AnalysisSettings;
  readonly sampleRateHz: number;
  /** The periodogram of one segment; its `nperseg`, `bins` and `binHz` are the plan's. */
  readonly periodogram: SegmentPeriodogram;
  /** Samples from one segment's start to the next one's (nperseg − noverlap). */
  readonly step: number;
  /** Top of the trusted spectrum, Hz ({@link USABLE_NYQUIST_FRACTION} of Nyquist). */
  readonly maxFreqHz: number;
  /** Noise floor corner, Hz (lowered for slow logs). */
  readonly floorCornerHz: number;
  /** Analysis bands below maxFreqHz, and the bin range [first, end) of each. */
  readonly bands: readonly FrequencyBand[];
  readonly bandRanges: readonly { first: number; end: number }[];
  /** Equal throttle bands over 0..1; one when the log has no throttle. */
  readonly throttleBands: number;
  readonly orders: readonly TrackedOrder[];
  /** Motor numbers with an rpm column, in block order. */
  readonly motors: readonly number[];
  /** How peaks are searched in every spectrum of the log. */
  readonly peakSearch: PeakSearch;
}

/** The plan for a log described by `info`. Throws RangeError on impossible Welch settings. */
export function planAnalysis(info: LogInfo, settings: AnalysisSettings): AnalysisPlan {
  const fs = info.sampleRateHz;
  const nperseg = settings.nperseg ?? defaultNperseg(fs);
  const resolved = resolveWelchOptions(fs, welchOptionsOf(settings, nperseg));
  const periodogram = new SegmentPeriodogram(fs, resolved);
  const maxFreqHz = USABLE_NYQUIST_FRACTION * (fs / 2);
  const bands = bandsBelow(settings.bandEdgesHz, maxFreqHz);
  return {
    settings,
    sampleRateHz: fs,
    periodogram,
    step: resolved.nperseg - resolved.noverlap,
    maxFreqHz,
    floorCornerHz: floorCorner(settings, maxFreqHz),
    bands,
    bandRanges: bands.map((b) => bandBins(b, periodogram.binHz, periodogram.bins)),
    throttleBands: info.hasThrottle ? settings.throttleBands : 1,
    orders: trackedOrders(settings.bladeCount).map((order) => ({
      order,
      label: order === settings.bladeCount ? "blade-pass" : `${order}x`,
    })),
    motors: info.motors,
    peakSearch: {
      minFreqHz: settings.minFreqHz,
      maxFreqHz,
      minProminenceDb: settings.minProminenceDb,
    },
  };
}

/** Index of the throttle band a value in 0..1 falls in; values outside are clamped. */
export function throttleBandOf(throttle: number, bands: number): number {
  if (bands <= 1) return 0;
  const i = Math.floor(throttle * bands);
  return i < 0 ? 0 : i >= bands ? bands - 1 : i;
}

/** The [lo, hi) throttle range of band `index`. */
export function throttleRangeOf(index: number, bands: number): { lo: number; hi: number } {
  return bands === 1 ? { lo: 0, hi: 1 } : { lo: index / bands, hi: (index + 1) / bands };
}

/**
 * Why a log that was read holds no analysis segment, in the user's terms: the analyser's and the
 * upload check's one sentence.
 */
export function noSegmentError(
  summary: Pick<ReadSummary, "samples" | "gaps">,
  sampleRateHz: number,
  nperseg: number,
): LogFormatError {
  const longestRun = summary.gaps.length > 0 ? " in one stretch without a gap" : "";
  return new LogFormatError(
    `the log has ${summary.samples} samples at ${Math.round(sampleRateHz)} Hz; one analysis segment needs ${nperseg} samples (${(nperseg / sampleRateHz).toFixed(2)} s)${longestRun}`,
  );
}
