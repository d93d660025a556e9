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
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (v.length === 0) return Number.NaN;
  const mid = v.length >> 1;
  return v.length % 2 === 1 ? (v[mid] ?? 0) : ((v[mid - 1] ?? 0) + (v[mid] ?? 0)) / 2;
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
