import { LogFormatError } from "../errors";
import { AXES, type Axis } from "../logs/columns";
import type { Gap, LogInfo, LogSink, ReadSummary, SampleBlock } from "../logs/read-log";
import {
  arrayToDb,
  bandBins,
  bandPower,
  noiseFloor,
  toDb,
  type FrequencyBand,
} from "../signal/bands";
import { spectralPeaks } from "../signal/peaks";
import { round } from "../signal/stats";
import {
  PeriodogramAverage,
  SegmentPeriodogram,
  defaultNperseg,
  resolveWelchOptions,
} from "../signal/welch";
import { classifyPeaks } from "./classify";
import { MASK_REASONS, OrderTracker, type MaskReason, type OrderBlock } from "./order-tracker";
import {
  DEFAULT_ANALYSIS,
  SIGNAL_CHECKS,
  TELEMETRY_LIMITS,
  USABLE_NYQUIST_FRACTION,
  trackedOrders,
  bandsBelow,
  floorCorner,
  welchOptionsOf,
  type AnalysisSettings,
} from "./settings";
import {
  ANALYSIS_VERSION,
  type AxisResult,
  type SignalCheck,
  type LogAnalysis,
  type MotorInBand,
  type MotorSummary,
  type MotorTrackPoint,
  type OrderLevel,
  type ThrottleBandAxis,
  type ThrottleBandResult,
} from "./types";

const MAX_TRACK_POINTS = 300;

/** Running extremes of one gyro axis and how many samples sat exactly at them. */
interface SignalStats {
  min: number;
  max: number;
  atMin: number;
  atMax: number;
}

/** Accumulators of one throttle band. */
interface BandAccumulator {
  segments: number;
  samples: number;
  throttleSum: number;
  psdSum: Float64Array[];
  /** per axis, per analysis band: Σ dB and Σ dB² over segments */
  dbSum: Float64Array[];
  dbSqSum: Float64Array[];
  /** per motor: Σ mean rpm of its measured (unmasked) order blocks, their count, the masked count */
  rpmSum: Float64Array;
  motorBlocks: Float64Array;
  maskedBlocks: Float64Array;
  /** per motor, per order, per axis: Σ power (linear), Σ sideband power (whole orders) */
  orderPowerSum: Float64Array[][];
  orderSideSum: Float64Array[][];
  /** per motor, per order: order-tracking blocks that measured it (below the trusted top) */
  orderCount: Float64Array[];
  orderBlocks: number;
}

/**
 * Turns a stream of sample blocks into a {@link LogAnalysis}. Welch segments are cut from a
 * sliding buffer as samples arrive, so memory stays at a few segments plus the accumulators,
 * whatever the log's length (median averaging, which needs every periodogram, is the exception).
 */
export class LogAnalyzer implements LogSink {
  private readonly settings: AnalysisSettings;
  private info: LogInfo | null = null;
  private periodogram: SegmentPeriodogram | null = null;
  private nperseg = 0;
  private step = 0;
  private bands: FrequencyBand[] = [];
  private bandRanges: { first: number; end: number }[] = [];
  private maxFreqHz = 0;

  private buffers: Float64Array[] = [];
  private fill = 0;
  private bufferStartS = 0;
  private timeS = 0;
  private segmentPsd: Float64Array[] = [];
  private overall: PeriodogramAverage[] = [];
  private segments = 0;
  private throttleBandCount = 1;
  private accumulators: BandAccumulator[] = [];
  private throttleSamples: Float64Array = new Float64Array(1);
  private tracks: MotorTrackPoint[][] = [];
  private orders: { order: number; label: OrderLevel["label"] }[] = [];
  /** per motor, per mask reason: blocks masked; and all blocks of the log */
  private masked: Record<MaskReason, number>[] = [];
  private blocksSeen = 0;
  private tracker: OrderTracker | null = null;
  private signal: SignalStats[] = [];

  constructor(settings: Partial<AnalysisSettings> = {}) {
    this.settings = { ...DEFAULT_ANALYSIS, ...settings };
    if (!(this.settings.overlap >= 0 && this.settings.overlap < 1)) {
      throw new RangeError(`overlap must be a fraction in [0, 1), got ${this.settings.overlap}`);
    }
  }

  begin(info: LogInfo): void {
    this.info = info;
    const fs = info.sampleRateHz;
    const nperseg = this.settings.nperseg ?? defaultNperseg(fs);
    const resolved = resolveWelchOptions(fs, welchOptionsOf(this.settings, nperseg));
    this.periodogram = new SegmentPeriodogram(fs, resolved);
    this.nperseg = resolved.nperseg;
    this.step = resolved.nperseg - resolved.noverlap;
    this.maxFreqHz = USABLE_NYQUIST_FRACTION * (fs / 2);
    this.bands = bandsBelow(this.settings.bandEdgesHz, this.maxFreqHz);
    const bins = this.periodogram.bins;
    this.bandRanges = this.bands.map((b) => bandBins(b, this.periodogram?.binHz ?? 1, bins));
    const motors = info.motors.length;
    // channels: 3 gyro axes and throttle
    this.buffers = Array.from({ length: 4 }, () => new Float64Array(this.nperseg));
    this.segmentPsd = AXES.map(() => new Float64Array(bins));
    this.overall = AXES.map(() => new PeriodogramAverage(bins, this.settings.average, "float32"));
    this.signal = AXES.map(() => ({ min: Infinity, max: -Infinity, atMin: 0, atMax: 0 }));
    this.throttleBandCount = info.hasThrottle ? this.settings.throttleBands : 1;
    this.throttleSamples = new Float64Array(this.throttleBandCount);
    this.orders = trackedOrders(this.settings.bladeCount).map((order) => ({
      order,
      label: order === this.settings.bladeCount ? "blade-pass" : `${order}x`,
    }));
    this.accumulators = Array.from({ length: this.throttleBandCount }, () => ({
      segments: 0,
      samples: 0,
      throttleSum: 0,
      psdSum: AXES.map(() => new Float64Array(bins)),
      dbSum: AXES.map(() => new Float64Array(this.bands.length)),
      dbSqSum: AXES.map(() => new Float64Array(this.bands.length)),
      rpmSum: new Float64Array(motors),
      motorBlocks: new Float64Array(motors),
      maskedBlocks: new Float64Array(motors),
      orderPowerSum: Array.from({ length: motors }, () =>
        this.orders.map(() => new Float64Array(3)),
      ),
      orderSideSum: Array.from({ length: motors }, () =>
        this.orders.map(() => new Float64Array(3)),
      ),
      orderCount: Array.from({ length: motors }, () => new Float64Array(this.orders.length)),
      orderBlocks: 0,
    }));
    this.tracker =
      motors > 0
        ? new OrderTracker(
            fs,
            motors,
            this.orders.map((o) => o.order),
            this.settings.minFreqHz,
            this.maxFreqHz,
            TELEMETRY_LIMITS,
            (b) => this.orderBlock(b),
          )
        : null;
    this.tracks = Array.from({ length: motors }, () => []);
    this.masked = Array.from({ length: motors }, () => ({ zero: 0, range: 0, stuck: 0, slew: 0 }));
    this.blocksSeen = 0;
  }

  gap(_gap: Gap): void {
    // No Welch segment (nor order block) may straddle a gap: start filling afresh.
    this.fill = 0;
    this.tracker?.reset();
  }

  private orderBlock(b: OrderBlock): void {
    const acc = this.accumulators[
      throttleBandOf(b.throttle, this.throttleBandCount)
    ] as BandAccumulator;
    acc.orderBlocks++;
    this.blocksSeen++;
    const one = this.orders.findIndex((o) => o.order === 1);
    for (let m = 0; m < b.rotationHz.length; m++) {
      const reason = b.masked[m];
      if (reason) {
        // Untrustworthy telemetry is counted, never measured.
        acc.maskedBlocks[m] = (acc.maskedBlocks[m] ?? 0) + 1;
        const counts = this.masked[m];
        if (counts) counts[reason]++;
        continue;
      }
      acc.motorBlocks[m] = (acc.motorBlocks[m] ?? 0) + 1;
      acc.rpmSum[m] = (acc.rpmSum[m] ?? 0) + (b.rotationHz[m] ?? 0) * 60;
      const counts = acc.orderCount[m] as Float64Array;
      let order1Max = Number.NaN;
      this.orders.forEach((_, j) => {
        const power = b.power[m]?.[j] as Float64Array;
        if (!Number.isFinite(power[0])) return;
        const sums = acc.orderPowerSum[m]?.[j] as Float64Array;
        const sideSums = acc.orderSideSum[m]?.[j] as Float64Array;
        const side = b.side[m]?.[j] as Float64Array;
        counts[j] = (counts[j] ?? 0) + 1;
        for (let a = 0; a < 3; a++) {
          sums[a] = (sums[a] ?? 0) + (power[a] ?? 0);
          sideSums[a] = (sideSums[a] ?? 0) + (Number.isFinite(side[a]) ? (side[a] ?? 0) : 0);
        }
        if (j === one) order1Max = Math.max(power[0] ?? 0, power[1] ?? 0, power[2] ?? 0);
      });
      this.tracks[m]?.push({
        tS: b.tS,
        rotationHz: b.rotationHz[m] ?? 0,
        order1Db: Number.isNaN(order1Max) ? Number.NaN : toDb(order1Max),
      });
    }
  }

  block(block: SampleBlock): void {
    const n = block.length;
    this.tracker?.push(n, block.timeS, block.gyro, block.throttle, block.rpm);
    const buffers = this.buffers;
    const throttle = block.throttle;
    const bandCount = this.throttleBandCount;
    for (let a = 0; a < 3; a++)
      trackExtremes(this.signal[a] as SignalStats, block.gyro[a] as Float64Array, n);
    for (let i = 0; i < n; i++) {
      if (this.fill === 0) this.bufferStartS = block.timeS[i] ?? 0;
      const f = this.fill;
      (buffers[0] as Float64Array)[f] = block.gyro[0][i] ?? 0;
      (buffers[1] as Float64Array)[f] = block.gyro[1][i] ?? 0;
      (buffers[2] as Float64Array)[f] = block.gyro[2][i] ?? 0;
      const thr = throttle ? (throttle[i] ?? 0) : 0;
      (buffers[3] as Float64Array)[f] = thr;
      const band = throttleBandOf(thr, bandCount);
      this.throttleSamples[band] = (this.throttleSamples[band] ?? 0) + 1;
      this.fill = f + 1;
      if (this.fill === this.nperseg) {
        this.timeS = block.timeS[i] ?? 0;
        this.segment();
        for (const b of buffers) b.copyWithin(0, this.step, this.nperseg);
        this.fill = this.nperseg - this.step;
        this.bufferStartS += this.step / (this.info?.sampleRateHz ?? 1);
      }
    }
  }

  private segment(): void {
    const periodogram = this.periodogram as SegmentPeriodogram;
    const bins = periodogram.bins;
    const binHz = periodogram.binHz;
    const n = this.nperseg;
    for (let a = 0; a < 3; a++) {
      periodogram.compute(this.buffers[a] as Float64Array, 0, this.segmentPsd[a] as Float64Array);
    }
    const thrBuf = this.buffers[3] as Float64Array;
    let thrMean = 0;
    for (let i = 0; i < n; i++) thrMean += thrBuf[i] ?? 0;
    thrMean /= n;
    const acc = this.accumulators[
      throttleBandOf(thrMean, this.throttleBandCount)
    ] as BandAccumulator;
    acc.segments++;
    acc.throttleSum += thrMean;
    for (let a = 0; a < 3; a++) {
      const psd = this.segmentPsd[a] as Float64Array;
      const bandSum = acc.psdSum[a] as Float64Array;
      for (let k = 0; k < bins; k++) {
        const v = psd[k] ?? 0;
        bandSum[k] = (bandSum[k] ?? 0) + v;
      }
      this.overall[a]?.add(psd);
      const dbSum = acc.dbSum[a] as Float64Array;
      const dbSq = acc.dbSqSum[a] as Float64Array;
      this.bandRanges.forEach((r, b) => {
        let p = 0;
        for (let k = r.first; k < r.end; k++) p += psd[k] ?? 0;
        const db = toDb(p * binHz);
        dbSum[b] = (dbSum[b] ?? 0) + db;
        dbSq[b] = (dbSq[b] ?? 0) + db * db;
      });
    }
    this.segments++;
  }

  /** Completes the analysis. Throws LogFormatError when no segment could be formed. */
  finish(summary: ReadSummary): LogAnalysis {
    const info = this.info;
    const periodogram = this.periodogram;
    if (!info || !periodogram) throw new LogFormatError("no samples were read");
    if (this.segments === 0) {
      const fs = info.sampleRateHz;
      const longestRun = summary.gaps.length > 0 ? " in one stretch without a gap" : "";
      throw new LogFormatError(
        `the log has ${summary.samples} samples at ${Math.round(fs)} Hz; one analysis segment needs ${this.nperseg} samples (${(this.nperseg / fs).toFixed(2)} s)${longestRun}`,
      );
    }
    const binHz = periodogram.binHz;
    const bins = periodogram.bins;
    const fs = info.sampleRateHz;
    const corner = floorCorner(this.settings, this.maxFreqHz);
    const psdOverall = this.overall.map((average) => average.result());

    const throttleBands: ThrottleBandResult[] = this.accumulators.map((acc, index) => {
      const lo = this.throttleBandCount === 1 ? 0 : index / this.throttleBandCount;
      const hi = this.throttleBandCount === 1 ? 1 : (index + 1) / this.throttleBandCount;
      const count = Math.max(acc.segments, 1);
      const axes = {} as Record<Axis, ThrottleBandAxis>;
      AXES.forEach((axis, a) => {
        const mean = new Float64Array(bins);
        const sum = acc.psdSum[a] as Float64Array;
        for (let k = 0; k < bins; k++) mean[k] = (sum[k] ?? 0) / count;
        const db = arrayToDb(mean);
        const dbSum = acc.dbSum[a] as Float64Array;
        const dbSq = acc.dbSqSum[a] as Float64Array;
        const bandDb = this.bands.map((_, b) => (dbSum[b] ?? 0) / count);
        const bandSpreadDb = this.bands.map((_, b) => {
          const m = (dbSum[b] ?? 0) / count;
          return Math.sqrt(Math.max(0, (dbSq[b] ?? 0) / count - m * m));
        });
        axes[axis] = {
          psdDb: Array.from(db, (v) => round(v, 2)),
          bandDb: bandDb.map((v) => round(v, 3)),
          bandSpreadDb: bandSpreadDb.map((v) => round(v, 3)),
          floorDb:
            acc.segments > 0
              ? round(toDb(noiseFloor(mean, binHz, corner, this.maxFreqHz)), 3)
              : Number.NaN,
          peaks:
            acc.segments >= this.settings.minBandSegments
              ? spectralPeaks(db, binHz, {
                  minFreqHz: this.settings.minFreqHz,
                  maxFreqHz: this.maxFreqHz,
                  minProminenceDb: this.settings.minProminenceDb,
                })
              : [],
        };
      });
      const motors: MotorInBand[] = info.motors.map((motor, m) => {
        const measured = acc.motorBlocks[m] ?? 0;
        const meanRpm = measured > 0 ? (acc.rpmSum[m] ?? 0) / measured : 0;
        return {
          motor,
          meanRpm: round(meanRpm, 1),
          blocks: acc.orderBlocks,
          maskedBlocks: acc.maskedBlocks[m] ?? 0,
          orders: this.orders.map((o, j) => {
            const sums = acc.orderPowerSum[m]?.[j] as Float64Array;
            const clear = acc.orderCount[m]?.[j] ?? 0;
            const sideSums = acc.orderSideSum[m]?.[j] as Float64Array;
            const powerDb = {} as Record<Axis, number>;
            const sideDb = {} as Record<Axis, number>;
            AXES.forEach((axis, a) => {
              powerDb[axis] = clear > 0 ? round(toDb((sums[a] ?? 0) / clear), 3) : Number.NaN;
              sideDb[axis] = clear > 0 ? round(toDb((sideSums[a] ?? 0) / clear), 3) : Number.NaN;
            });
            const level: OrderLevel = {
              order: o.order,
              label: o.label,
              freqHz: round((meanRpm / 60) * o.order, 2),
              powerDb,
            };
            if (Number.isInteger(o.order)) level.sideDb = sideDb;
            return level;
          }),
        };
      });
      return {
        index,
        lo,
        hi,
        seconds: round((this.throttleSamples[index] ?? 0) / fs, 3),
        segments: acc.segments,
        meanThrottle: acc.segments > 0 ? round(acc.throttleSum / acc.segments, 4) : (lo + hi) / 2,
        axes,
        motors,
      };
    });

    const axes = {} as Record<Axis, AxisResult>;
    AXES.forEach((axis, a) => {
      const psd = psdOverall[a] as Float64Array;
      const signal = checkSignal(
        this.signal[a] as SignalStats,
        summary.samples,
        psd,
        binHz,
        this.settings.minFreqHz,
        this.maxFreqHz,
      );
      if (!signal.usable) {
        // Nothing of this axis is judged; its spectrum is kept only where it is a number.
        for (let k = 0; k < bins; k++) if (!Number.isFinite(psd[k])) psd[k] = 0;
        axes[axis] = {
          signal,
          psd: Array.from(psd),
          peaks: [],
          bandPower: this.bands.map(() => 0),
          floorDb: Number.NaN,
          rmsDegS: 0,
        };
        return;
      }
      const db = arrayToDb(psd);
      const peaks = spectralPeaks(db, binHz, {
        minFreqHz: this.settings.minFreqHz,
        maxFreqHz: this.maxFreqHz,
        minProminenceDb: this.settings.minProminenceDb,
      });
      const usable = throttleBands.filter((b) => b.segments >= this.settings.minBandSegments);
      axes[axis] = {
        signal,
        psd: Array.from(psd),
        peaks: classifyPeaks(peaks, axis, usable, binHz),
        bandPower: this.bands.map((b) => bandPower(psd, binHz, b)),
        floorDb: round(toDb(noiseFloor(psd, binHz, corner, this.maxFreqHz)), 3),
        rmsDegS: Math.sqrt(
          bandPower(psd, binHz, { loHz: this.settings.minFreqHz, hiHz: this.maxFreqHz }),
        ),
      };
    });

    const motors: MotorSummary[] = info.motors.map((motor, m) => {
      const track = this.tracks[m] ?? [];
      const meanRpm =
        track.length > 0 ? (track.reduce((s, p) => s + p.rotationHz, 0) / track.length) * 60 : 0;
      const masked = this.masked[m] ?? { zero: 0, range: 0, stuck: 0, slew: 0 };
      const maskedBlocks = MASK_REASONS.reduce((s, r) => s + masked[r], 0);
      return {
        motor,
        meanRpm: round(meanRpm, 1),
        maskedShare: this.blocksSeen > 0 ? round(maskedBlocks / this.blocksSeen, 4) : 0,
        maskedBlocks: masked,
        track: decimateTrack(track, MAX_TRACK_POINTS),
      };
    });

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
        nperseg: this.nperseg,
        noverlap: this.nperseg - this.step,
        window: this.settings.window,
        average: this.settings.average,
        binHz,
        bladeCount: this.settings.bladeCount,
        minFreqHz: this.settings.minFreqHz,
        maxFreqHz: this.maxFreqHz,
        floorCornerHz: corner,
      },
      segments: this.segments,
      freqHz: Array.from(periodogram.freqHz),
      bands: this.bands,
      axes,
      hasThrottle: info.hasThrottle,
      throttleBands,
      motors,
    };
  }
}

function trackExtremes(st: SignalStats, x: Float64Array, n: number): void {
  let { min, max, atMin, atMax } = st;
  for (let i = 0; i < n; i++) {
    const v = x[i] as number;
    if (v > max) {
      max = v;
      atMax = 1;
    } else if (v === max) atMax++;
    if (v < min) {
      min = v;
      atMin = 1;
    } else if (v === min) atMin++;
  }
  st.min = min;
  st.max = max;
  st.atMin = atMin;
  st.atMax = atMax;
}

/** Whether a gyro axis carries a signal worth comparing ({@link SIGNAL_CHECKS}). */
function checkSignal(
  st: SignalStats,
  samples: number,
  psd: Float64Array,
  binHz: number,
  loHz: number,
  hiHz: number,
): SignalCheck {
  const n = Math.max(1, samples);
  const clippedShare = st.max === st.min ? 1 : Math.max(st.atMax, st.atMin) / n;
  const base = { clippedShare: round(clippedShare, 4), minDegS: st.min, maxDegS: st.max };
  const peak = Math.max(Math.abs(st.min), Math.abs(st.max));
  let finite = true;
  for (let k = 0; k < psd.length; k++) if (!Number.isFinite(psd[k])) finite = false;
  if (!finite || !(peak <= SIGNAL_CHECKS.maxPlausibleDegS)) {
    return {
      ...base,
      usable: false,
      problem: "out-of-range",
      text: `values reach ${peak.toPrecision(3)} deg/s, beyond any rate gyro's range (a broken cell or a wrong unit)`,
    };
  }
  if (st.max === st.min) {
    return {
      ...base,
      usable: false,
      problem: "constant",
      text: `every sample is ${st.max} deg/s: the gyro was not recording or is stuck`,
    };
  }
  const rms = Math.sqrt(bandPower(psd, binHz, { loHz, hiHz }));
  if (!(rms >= SIGNAL_CHECKS.flatRmsDegS)) {
    return {
      ...base,
      usable: false,
      problem: "flat",
      text: `vibration above ${loHz} Hz is only ${rms.toPrecision(2)} deg/s rms, less than one step of a gyro: no signal to judge`,
    };
  }
  if (clippedShare >= SIGNAL_CHECKS.clippedShare) {
    const at = st.atMax >= st.atMin ? st.max : st.min;
    return {
      ...base,
      usable: false,
      problem: "clipped",
      text: `${(clippedShare * 100).toFixed(1)} % of the samples sit at ${at} deg/s: the gyro is saturated (clipped), which spreads false vibration over the spectrum`,
    };
  }
  return { ...base, usable: true };
}

/** Index of the throttle band a value in 0..1 falls in; values outside are clamped. */
export function throttleBandOf(throttle: number, bands: number): number {
  if (bands <= 1) return 0;
  const i = Math.floor(throttle * bands);
  return i < 0 ? 0 : i >= bands ? bands - 1 : i;
}

function decimateTrack(track: MotorTrackPoint[], maxPoints: number): MotorTrackPoint[] {
  if (track.length <= maxPoints) return track.map(roundPoint);
  const group = Math.ceil(track.length / maxPoints);
  const out: MotorTrackPoint[] = [];
  for (let i = 0; i < track.length; i += group) {
    const part = track.slice(i, i + group);
    const n = part.length;
    out.push(
      roundPoint({
        tS: part.reduce((s, p) => s + p.tS, 0) / n,
        rotationHz: part.reduce((s, p) => s + p.rotationHz, 0) / n,
        order1Db: meanDb(part.map((p) => p.order1Db)),
      }),
    );
  }
  return out;
}

/** Power mean of dB values, skipping NaN (segments where the order was not clear). */
function meanDb(values: number[]): number {
  const v = values.filter(Number.isFinite);
  return v.length === 0 ? Number.NaN : toDb(v.reduce((s, x) => s + 10 ** (x / 10), 0) / v.length);
}

function roundPoint(p: MotorTrackPoint): MotorTrackPoint {
  return { tS: round(p.tS, 3), rotationHz: round(p.rotationHz, 2), order1Db: round(p.order1Db, 2) };
}
