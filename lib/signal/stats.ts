/** Small statistics helpers shared by the analysis and health code. NaN entries are skipped. */

export function round(v: number, digits: number): number {
  if (!Number.isFinite(v)) return v;
  const k = 10 ** digits;
  return Math.round(v * k) / k;
}

export function mean(values: readonly number[]): number {
  const v = values.filter(Number.isFinite);
  return v.length === 0 ? Number.NaN : v.reduce((s, x) => s + x, 0) / v.length;
}

/** Sample standard deviation (n − 1); 0 for fewer than two values. */
export function stdDev(values: readonly number[]): number {
  const v = values.filter(Number.isFinite);
  if (v.length < 2) return 0;
  const m = mean(v);
  return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
}

/** Median (mean of the two middle values for an even count); NaN for none. */
export function median(values: readonly number[]): number {
  return middleOfSorted(values.filter(Number.isFinite).sort((a, b) => a - b));
}

/**
 * The median of values already sorted ascending: the middle one, or the mean of the two middle
 * ones for an even count; NaN for none. The one median rule of `lib/signal`, for callers that sort
 * a typed array in place (NaN sorts last there) rather than filter a list.
 */
export function middleOfSorted(sorted: ArrayLike<number>): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const mid = n >> 1;
  return n % 2 === 1 ? (sorted[mid] ?? 0) : ((sorted[mid - 1] ?? 0) + (sorted[mid] ?? 0)) / 2;
}

/** Mean weighted by w (weights ≥ 0); NaN when the weights sum to zero. */
export function weightedMean(values: readonly number[], weights: readonly number[]): number {
  let s = 0;
  let w = 0;
  values.forEach((v, i) => {
    const wi = weights[i] ?? 0;
    if (Number.isFinite(v) && wi > 0) {
      s += v * wi;
      w += wi;
    }
  });
  return w > 0 ? s / w : Number.NaN;
}
