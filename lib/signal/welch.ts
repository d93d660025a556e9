import { RealPowerSpectrum } from "./fft";
import { middleOfSorted } from "./stats";
import { makeWindow, windowSums, type WindowName } from "./windows";

/**
 * Welch's averaged periodogram (P. D. Welch, 1967), following the conventions of
 * `scipy.signal.welch`: periodic window, constant detrend per segment, one-sided output with the
 * DC bin and (N even, always here) the Nyquist bin not doubled, mean or bias-corrected median
 * averaging. Density is in (input unit)²/Hz; spectrum is in (input unit)².
 */

export type Scaling = "density" | "spectrum";
export type Averaging = "mean" | "median";
export type Detrend = "constant" | "none";

export interface WelchOptions {
  /** Samples per segment; a power of two. Default: {@link defaultNperseg} (bins ≤ 2 Hz). */
  nperseg?: number;
  /** Samples shared by consecutive segments, 0 ≤ noverlap < nperseg. Default nperseg/2 (50 %). */
  noverlap?: number;
  /** Default "hann" (periodic). */
  window?: WindowName;
  /** Default "density". */
  scaling?: Scaling;
  /** Default "mean". */
  average?: Averaging;
  /** Default "constant" (segment mean removed). */
  detrend?: Detrend;
}

export interface ResolvedWelchOptions {
  nperseg: number;
  noverlap: number;
  window: WindowName;
  scaling: Scaling;
  average: Averaging;
  detrend: Detrend;
}

export interface WelchResult {
  /** Bin centre frequencies, k·fs/nperseg for k = 0..nperseg/2. */
  freqHz: Float64Array;
  psd: Float64Array;
  /** Number of segments averaged. */
  segments: number;
}

/**
 * Smallest power-of-two segment length whose bins are at most `maxBinHz` wide (default 2 Hz),
 * and never below 64 samples.
 */
export function defaultNperseg(sampleRateHz: number, maxBinHz = 2): number {
  if (!(sampleRateHz > 0) || !(maxBinHz > 0)) {
    throw new RangeError("sample rate and bin width must be positive");
  }
  let n = 64;
  while (sampleRateHz / n > maxBinHz) n *= 2;
  return n;
}

/** Validates options once and fills defaults. Throws RangeError with a plain message. */
export function resolveWelchOptions(
  sampleRateHz: number,
  options: WelchOptions = {},
): ResolvedWelchOptions {
  if (!Number.isFinite(sampleRateHz) || sampleRateHz <= 0) {
    throw new RangeError(`sample rate must be a positive number of Hz, got ${sampleRateHz}`);
  }
  const nperseg = options.nperseg ?? defaultNperseg(sampleRateHz);
  if (!Number.isInteger(nperseg) || nperseg < 4 || (nperseg & (nperseg - 1)) !== 0) {
    throw new RangeError(`nperseg must be a power of two ≥ 4, got ${nperseg}`);
  }
  const noverlap = options.noverlap ?? Math.floor(nperseg / 2);
  if (!Number.isInteger(noverlap) || noverlap < 0 || noverlap >= nperseg) {
    throw new RangeError(`noverlap must be an integer in [0, nperseg), got ${noverlap}`);
  }
  return {
    nperseg,
    noverlap,
    window: options.window ?? "hann",
    scaling: options.scaling ?? "density",
    average: options.average ?? "mean",
    detrend: options.detrend ?? "constant",
  };
}

/**
 * The one-sided, scaled periodogram of one segment. Owns its window and scratch buffers; reuse one
 * instance for every segment of a log.
 */
export class SegmentPeriodogram {
  readonly nperseg: number;
  readonly bins: number;
  readonly freqHz: Float64Array;
  /** Width of one bin in Hz. */
  readonly binHz: number;
  private readonly window: Float64Array;
  private readonly frame: Float64Array;
  private readonly power: RealPowerSpectrum;
  private readonly scale: number;
  private readonly detrend: Detrend;

  constructor(sampleRateHz: number, options: ResolvedWelchOptions) {
    this.nperseg = options.nperseg;
    this.bins = options.nperseg / 2 + 1;
    this.binHz = sampleRateHz / options.nperseg;
    this.window = makeWindow(options.window, options.nperseg);
    this.frame = new Float64Array(options.nperseg);
    this.power = new RealPowerSpectrum(options.nperseg);
    this.detrend = options.detrend;
    const { s1, s2 } = windowSums(this.window);
    this.scale = options.scaling === "density" ? 1 / (sampleRateHz * s2) : 1 / (s1 * s1);
    this.freqHz = new Float64Array(this.bins);
    for (let k = 0; k < this.bins; k++) this.freqHz[k] = k * this.binHz;
  }

  /** Periodogram of x[start .. start+nperseg) into target[0..bins). The caller checks the range. */
  compute(x: Float64Array, start: number, target: Float64Array): void {
    const n = this.nperseg;
    let mean = 0;
    if (this.detrend === "constant") {
      for (let i = 0; i < n; i++) mean += x[start + i] ?? 0;
      mean /= n;
    }
    const frame = this.frame;
    const w = this.window;
    for (let i = 0; i < n; i++) frame[i] = ((x[start + i] ?? 0) - mean) * (w[i] ?? 0);
    this.power.compute(frame, target);
    const last = this.bins - 1;
    const scale = this.scale;
    // One-sided: every bin but DC and Nyquist stands for its negative-frequency twin as well.
    // DC and Nyquist have no twin, so they are not doubled.
    target[0] = (target[0] ?? 0) * scale;
    for (let k = 1; k < last; k++) target[k] = (target[k] ?? 0) * 2 * scale;
    target[last] = (target[last] ?? 0) * scale;
  }
}

/**
 * Bias of the median of n periodogram values relative to their mean, as scipy's `_median_bias`:
 * b(n) = 1 + Σ_{k=1}^{⌊(n−1)/2⌋} (1/(2k+1) − 1/(2k)). Tends to ln 2.
 */
export function medianBias(n: number): number {
  let b = 1;
  const last = Math.floor((n - 1) / 2);
  for (let k = 1; k <= last; k++) b += 1 / (2 * k + 1) - 1 / (2 * k);
  return b;
}

/** A contiguous run of samples [start, end) with no gap inside. */
export interface SampleRun {
  start: number;
  end: number;
}

/** Start indices of every Welch segment that fits inside the runs; no segment straddles two runs. */
export function segmentStarts(
  runs: readonly SampleRun[],
  nperseg: number,
  noverlap: number,
): number[] {
  const step = nperseg - noverlap;
  const starts: number[] = [];
  for (const run of runs) {
    for (let s = run.start; s + nperseg <= run.end; s += step) starts.push(s);
  }
  return starts;
}

/**
 * Welch PSD of a whole signal (or of the given gap-free runs of it). Throws RangeError when not
 * even one segment fits. `x` is read, never written.
 */
export function welch(
  x: Float64Array,
  sampleRateHz: number,
  options: WelchOptions = {},
  runs: readonly SampleRun[] = [{ start: 0, end: x.length }],
): WelchResult {
  const resolved = resolveWelchOptions(sampleRateHz, options);
  const periodogram = new SegmentPeriodogram(sampleRateHz, resolved);
  const starts = segmentStarts(runs, resolved.nperseg, resolved.noverlap);
  if (starts.length === 0) {
    throw new RangeError(
      `a signal of ${x.length} samples is shorter than one segment of ${resolved.nperseg} samples`,
    );
  }
  const average = new PeriodogramAverage(periodogram.bins, resolved.average);
  const one = new Float64Array(periodogram.bins);
  for (const s of starts) {
    periodogram.compute(x, s, one);
    average.add(one);
  }
  return { freqHz: periodogram.freqHz, psd: average.result(), segments: starts.length };
}

/** How {@link PeriodogramAverage} keeps the periodograms a median needs. */
export type KeptPrecision = "float64" | "float32";

/**
 * Averages periodograms bin by bin: the one place Welch's average is taken. "mean" keeps a running
 * sum; "median" keeps every periodogram and divides the bin-wise median (the mean of the two middle
 * values for an even count) by {@link medianBias}, as `scipy.signal.csd` does, so that both
 * estimate the same density. `keep: "float32"` halves the memory the median needs on long logs at
 * about 1e-7 relative precision. Periodograms passed to `add` are copied or summed, never kept.
 */
export class PeriodogramAverage {
  readonly bins: number;
  readonly average: Averaging;
  private readonly keep: KeptPrecision;
  private readonly sum: Float64Array;
  private readonly kept: (Float64Array | Float32Array)[] = [];
  private added = 0;

  constructor(bins: number, average: Averaging, keep: KeptPrecision = "float64") {
    this.bins = bins;
    this.average = average;
    this.keep = keep;
    this.sum = new Float64Array(average === "mean" ? bins : 0);
  }

  /** Periodograms added so far. */
  get count(): number {
    return this.added;
  }

  /** Adds one periodogram of `bins` values. */
  add(periodogram: Float64Array): void {
    this.added++;
    if (this.average === "median") {
      this.kept.push(
        this.keep === "float32"
          ? Float32Array.from(periodogram.subarray(0, this.bins))
          : periodogram.slice(0, this.bins),
      );
      return;
    }
    const sum = this.sum;
    for (let k = 0; k < this.bins; k++) sum[k] = (sum[k] ?? 0) + (periodogram[k] ?? 0);
  }

  /** The average into `target` (a new array by default); zeros when nothing was added. */
  result(target: Float64Array = new Float64Array(this.bins)): Float64Array {
    const count = this.added;
    if (count === 0) return target.fill(0);
    if (this.average === "mean") {
      for (let k = 0; k < this.bins; k++) target[k] = (this.sum[k] ?? 0) / count;
      return target;
    }
    const bias = medianBias(count);
    const column = new Float64Array(count);
    for (let k = 0; k < this.bins; k++) {
      for (let j = 0; j < count; j++) column[j] = this.kept[j]?.[k] ?? 0;
      target[k] = middleOfSorted(column.sort()) / bias;
    }
    return target;
  }
}
