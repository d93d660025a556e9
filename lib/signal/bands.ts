import { middleOfSorted } from "./stats";

/** Integrals and summaries of a one-sided PSD on a uniform grid (bin k at k·binHz). */

/** A frequency band [loHz, hiHz). */
export interface FrequencyBand {
  loHz: number;
  hiHz: number;
}

/** Bin index range [first, end) of the bins whose centres fall inside the band. */
export function bandBins(
  band: FrequencyBand,
  binHz: number,
  bins: number,
): { first: number; end: number } {
  const first = Math.max(0, Math.ceil(band.loHz / binHz - 1e-9));
  const end = Math.min(bins, Math.ceil(band.hiHz / binHz - 1e-9));
  return { first, end: Math.max(first, end) };
}

/**
 * Power in a band: Σ PSD·Δf over its bins, in (unit)² for a density in (unit)²/Hz.
 * Rectangle rule, which is exact for Parseval's sum over the whole one-sided spectrum.
 */
export function bandPower(psd: Float64Array, binHz: number, band: FrequencyBand): number {
  const { first, end } = bandBins(band, binHz, psd.length);
  let sum = 0;
  for (let k = first; k < end; k++) sum += psd[k] ?? 0;
  return sum * binHz;
}

/** Median PSD over the bins at or above `cornerHz` (and below `maxHz`): a robust noise floor. */
export function noiseFloor(
  psd: Float64Array,
  binHz: number,
  cornerHz: number,
  maxHz = Infinity,
): number {
  const { first, end } = bandBins({ loHz: cornerHz, hiHz: maxHz }, binHz, psd.length);
  if (end <= first) return Number.NaN;
  return middleOfSorted(psd.slice(first, end).sort());
}

/** 10·log10 of a power, floored so that zero power gives a finite, very low level. */
export function toDb(power: number): number {
  return 10 * Math.log10(Math.max(power, 1e-30));
}

/** dB of every value into a new array. */
export function arrayToDb(values: Float64Array): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = toDb(values[i] ?? 0);
  return out;
}
