import { axisRecord, perAxis, type PerAxis } from "../logs/columns";
import type { SampleBlock } from "../logs/read-log";
import { arrayToDb, noiseFloor, toDb } from "../signal/bands";
import { spectralPeaks } from "../signal/peaks";
import { round } from "../signal/stats";
import { PeriodogramAverage } from "../signal/welch";
import { throttleBandOf, throttleRangeOf, type AnalysisPlan } from "./plan";
import type { ThrottleBandResult } from "./types";

/** Welch sums of the segments whose mean throttle fell in one throttle band. */
interface BandSums {
  segments: number;
  throttleSum: number;
  /** Mean PSD of the band's segments, whatever the log's averaging. */
  psd: PerAxis<PeriodogramAverage>;
  /** Per analysis band: Σ dB and Σ dB² over segments. */
  dbSum: PerAxis<Float64Array>;
  dbSqSum: PerAxis<Float64Array>;
}

/** A throttle band's Welch result: everything but its motors. */
export type ThrottleBandSpectra = Omit<ThrottleBandResult, "motors">;

/**
 * Welch segments cut from a sliding buffer as samples arrive, each added to the whole log's
 * average and to its throttle band's sums: memory stays at one segment plus the sums, whatever
 * the log's length (median averaging, which keeps every periodogram, is the exception).
 */
export class WelchBands {
  private readonly plan: AnalysisPlan;
  /** The sliding segment: the three gyro axes and the throttle (0 without a throttle column). */
  private readonly gyro: PerAxis<Float64Array>;
  private readonly throttle: Float64Array;
  private fill = 0;
  private readonly segmentPsd: PerAxis<Float64Array>;
  private readonly overall: PerAxis<PeriodogramAverage>;
  private readonly sums: BandSums[];
  /** Samples whose throttle fell in each throttle band. */
  private readonly throttleSamples: Float64Array;
  private segmentCount = 0;

  constructor(plan: AnalysisPlan) {
    this.plan = plan;
    const { nperseg, bins } = plan.periodogram;
    const bands = plan.bands.length;
    this.gyro = perAxis(() => new Float64Array(nperseg));
    this.throttle = new Float64Array(nperseg);
    this.segmentPsd = perAxis(() => new Float64Array(bins));
    // Median averaging keeps every segment's periodogram: float32 halves that memory.
    this.overall = perAxis(() => new PeriodogramAverage(bins, plan.settings.average, "float32"));
    this.sums = Array.from({ length: plan.throttleBands }, () => ({
      segments: 0,
      throttleSum: 0,
      psd: perAxis(() => new PeriodogramAverage(bins, "mean")),
      dbSum: perAxis(() => new Float64Array(bands)),
      dbSqSum: perAxis(() => new Float64Array(bands)),
    }));
    this.throttleSamples = new Float64Array(plan.throttleBands);
  }

  /** Welch segments formed so far. */
  get segments(): number {
    return this.segmentCount;
  }

  /** No segment may straddle a gap: the next one starts after it. */
  gap(): void {
    this.fill = 0;
  }

  push(block: SampleBlock): void {
    const n = block.length;
    const [g0, g1, g2] = block.gyro;
    const [b0, b1, b2] = this.gyro;
    const thrBuf = this.throttle;
    const throttle = block.throttle;
    const bandCount = this.plan.throttleBands;
    const nperseg = this.plan.periodogram.nperseg;
    const step = this.plan.step;
    for (let i = 0; i < n; i++) {
      const f = this.fill;
      b0[f] = g0[i] ?? 0;
      b1[f] = g1[i] ?? 0;
      b2[f] = g2[i] ?? 0;
      const thr = throttle ? (throttle[i] ?? 0) : 0;
      thrBuf[f] = thr;
      const band = throttleBandOf(thr, bandCount);
      this.throttleSamples[band] = (this.throttleSamples[band] ?? 0) + 1;
      this.fill = f + 1;
      if (this.fill === nperseg) {
        this.segment();
        for (const b of [b0, b1, b2, thrBuf]) b.copyWithin(0, step, nperseg);
        this.fill = nperseg - step;
      }
    }
  }

  private segment(): void {
    const { periodogram, bandRanges, throttleBands } = this.plan;
    const binHz = periodogram.binHz;
    const n = periodogram.nperseg;
    let thrMean = 0;
    for (let i = 0; i < n; i++) thrMean += this.throttle[i] ?? 0;
    thrMean /= n;
    const sums = this.sums[throttleBandOf(thrMean, throttleBands)];
    if (!sums) return;
    sums.segments++;
    sums.throttleSum += thrMean;
    for (const a of [0, 1, 2] as const) {
      const psd = this.segmentPsd[a];
      periodogram.compute(this.gyro[a], 0, psd);
      this.overall[a].add(psd);
      sums.psd[a].add(psd);
      const dbSum = sums.dbSum[a];
      const dbSq = sums.dbSqSum[a];
      bandRanges.forEach((r, b) => {
        let p = 0;
        for (let k = r.first; k < r.end; k++) p += psd[k] ?? 0;
        const db = toDb(p * binHz);
        dbSum[b] = (dbSum[b] ?? 0) + db;
        dbSq[b] = (dbSq[b] ?? 0) + db * db;
      });
    }
    this.segmentCount++;
  }

  /** The whole log's averaged PSD per axis, (deg/s)²/Hz, in new arrays. */
  overallPsd(): [Float64Array, Float64Array, Float64Array] {
    return perAxis((_axis, a) => this.overall[a].result());
  }

  /** Every throttle band's spectra, band levels, floor and peaks. */
  bandSpectra(): ThrottleBandSpectra[] {
    return this.sums.map((sums, index) => this.bandResult(sums, index));
  }

  private bandResult(sums: BandSums, index: number): ThrottleBandSpectra {
    const { settings, bands, periodogram, floorCornerHz, maxFreqHz, throttleBands } = this.plan;
    const { lo, hi } = throttleRangeOf(index, throttleBands);
    const binHz = periodogram.binHz;
    const count = Math.max(sums.segments, 1);
    const axes = axisRecord((_axis, a) => {
      const mean = sums.psd[a].result();
      const db = arrayToDb(mean);
      const dbSum = sums.dbSum[a];
      const dbSq = sums.dbSqSum[a];
      const bandDb = bands.map((_, b) => (dbSum[b] ?? 0) / count);
      const bandSpreadDb = bands.map((_, b) => {
        const m = (dbSum[b] ?? 0) / count;
        return Math.sqrt(Math.max(0, (dbSq[b] ?? 0) / count - m * m));
      });
      return {
        psdDb: Array.from(db, (v) => round(v, 2)),
        bandDb: bandDb.map((v) => round(v, 3)),
        bandSpreadDb: bandSpreadDb.map((v) => round(v, 3)),
        floorDb:
          sums.segments > 0
            ? round(toDb(noiseFloor(mean, binHz, floorCornerHz, maxFreqHz)), 3)
            : Number.NaN,
        peaks:
          sums.segments >= settings.minBandSegments
            ? spectralPeaks(db, binHz, this.plan.peakSearch)
            : [],
      };
    });
    return {
      index,
      lo,
      hi,
      seconds: round((this.throttleSamples[index] ?? 0) / this.plan.sampleRateHz, 3),
      segments: sums.segments,
      meanThrottle: sums.segments > 0 ? round(sums.throttleSum / sums.segments, 4) : (lo + hi) / 2,
      axes,
    };
  }
}
