import { LogFormatError } from "../errors";
import { axisRecord, perAxis, type Axis, type PerAxis } from "../logs/columns";
import type { Gap, LogInfo, LogSink, ReadSummary, SampleBlock } from "../logs/read-log";
import { arrayToDb, bandPower, noiseFloor, toDb } from "../signal/bands";
import { spectralPeaks } from "../signal/peaks";
import { round } from "../signal/stats";
import { classifyPeaks } from "./classify";
import { OrderBands } from "./order-bands";
import { noSegmentError, planAnalysis, type AnalysisPlan } from "./plan";
import { DEFAULT_ANALYSIS, type AnalysisSettings } from "./settings";
import { checkSignal, newSignalStats, trackExtremes, type SignalStats } from "./signal-check";
import {
  ANALYSIS_VERSION,
  type AxisResult,
  type LogAnalysis,
  type ThrottleBandResult,
} from "./types";
import { WelchBands } from "./welch-bands";

/** The state of one log's analysis, made when its header has been read. */
interface AnalysisRun {
  readonly info: LogInfo;
  readonly plan: AnalysisPlan;
  readonly welch: WelchBands;
  /** Null when the log has no rpm columns: there are no orders to track. */
  readonly orders: OrderBands | null;
  readonly signal: PerAxis<SignalStats>;
}

/**
 * Turns a stream of sample blocks into a {@link LogAnalysis}: Welch spectra per throttle band
 * ({@link WelchBands}), motor orders per throttle band ({@link OrderBands}) and the gyro signal
 * checks, fed in one pass; memory stays at a few segments plus the sums, whatever the log's length
 * (median averaging, which needs every periodogram, is the exception).
 */
export class LogAnalyzer implements LogSink {
  private readonly settings: AnalysisSettings;
  /** Null until the header has been read. */
  private run: AnalysisRun | null = null;

  constructor(settings: Partial<AnalysisSettings> = {}) {
    this.settings = { ...DEFAULT_ANALYSIS, ...settings };
    if (!(this.settings.overlap >= 0 && this.settings.overlap < 1)) {
      throw new RangeError(`overlap must be a fraction in [0, 1), got ${this.settings.overlap}`);
    }
  }

  begin(info: LogInfo): void {
    const plan = planAnalysis(info, this.settings);
    this.run = {
      info,
      plan,
      welch: new WelchBands(plan),
      orders: info.motors.length > 0 ? new OrderBands(plan) : null,
      signal: perAxis(newSignalStats),
    };
  }

  gap(_gap: Gap): void {
    // No Welch segment (nor order block) may straddle a gap: start filling afresh.
    const run = this.started();
    run.welch.gap();
    run.orders?.gap();
  }

  block(block: SampleBlock): void {
    const run = this.started();
    run.orders?.push(block);
    for (const a of [0, 1, 2] as const) trackExtremes(run.signal[a], block.gyro[a], block.length);
    run.welch.push(block);
  }

  /** Completes the analysis. Throws LogFormatError when no segment could be formed. */
  finish(summary: ReadSummary): LogAnalysis {
    const run = this.run;
    if (!run) throw new LogFormatError("no samples were read");
    const { info, plan, welch } = run;
    const { settings, periodogram } = plan;
    const fs = plan.sampleRateHz;
    if (welch.segments === 0) throw noSegmentError(summary, fs, periodogram.nperseg);
    const throttleBands = throttleBandResults(run);
    return {
      version: ANALYSIS_VERSION,
      sampleRateHz: round(fs, 3),
      durationS: round(summary.durationS, 3),
      samples: summary.samples,
      gaps: summary.gaps,
      droppedRows: summary.droppedRows,
      metadata: info.metadata,
      guesses: info.guesses,
      settings: {
        nperseg: periodogram.nperseg,
        noverlap: periodogram.nperseg - plan.step,
        window: settings.window,
        average: settings.average,
        binHz: periodogram.binHz,
        bladeCount: settings.bladeCount,
        minFreqHz: settings.minFreqHz,
        maxFreqHz: plan.maxFreqHz,
        floorCornerHz: plan.floorCornerHz,
      },
      segments: welch.segments,
      freqHz: Array.from(periodogram.freqHz),
      bands: [...plan.bands],
      axes: axisResults(run, summary, throttleBands),
      hasThrottle: info.hasThrottle,
      throttleBands,
      motors: run.orders?.summaries() ?? [],
    };
  }

  private started(): AnalysisRun {
    if (!this.run) throw new Error("LogAnalyzer: a block or gap before begin()");
    return this.run;
  }
}

/** Each throttle band's spectra with its motors' order levels. */
function throttleBandResults(run: AnalysisRun): ThrottleBandResult[] {
  return run.welch.bandSpectra().map((band) => ({
    ...band,
    motors: run.orders?.bandMotors(band.index) ?? [],
  }));
}

/**
 * Each axis's whole-log spectrum, signal check, labelled peaks, band powers and floor. An axis
 * without a usable signal keeps only its spectrum (where it is a number) and is not judged.
 */
function axisResults(
  run: AnalysisRun,
  summary: ReadSummary,
  throttleBands: readonly ThrottleBandResult[],
): Record<Axis, AxisResult> {
  const { plan } = run;
  const { settings, bands, maxFreqHz } = plan;
  const binHz = plan.periodogram.binHz;
  const psds = run.welch.overallPsd();
  const usableBands = throttleBands.filter((b) => b.segments >= settings.minBandSegments);
  return axisRecord((axis, a) => {
    const psd = psds[a];
    const signal = checkSignal(
      run.signal[a],
      summary.samples,
      psd,
      binHz,
      settings.minFreqHz,
      maxFreqHz,
    );
    if (!signal.usable) {
      for (let k = 0; k < psd.length; k++) if (!Number.isFinite(psd[k])) psd[k] = 0;
      return {
        signal,
        psd: Array.from(psd),
        peaks: [],
        bandPower: bands.map(() => 0),
        floorDb: Number.NaN,
        rmsDegS: 0,
      };
    }
    const peaks = spectralPeaks(arrayToDb(psd), binHz, plan.peakSearch);
    return {
      signal,
      psd: Array.from(psd),
      peaks: classifyPeaks(peaks, axis, usableBands, binHz),
      bandPower: bands.map((b) => bandPower(psd, binHz, b)),
      floorDb: round(toDb(noiseFloor(psd, binHz, plan.floorCornerHz, maxFreqHz)), 3),
      rmsDegS: Math.sqrt(bandPower(psd, binHz, { loHz: settings.minFreqHz, hiHz: maxFreqHz })),
    };
  });
}
