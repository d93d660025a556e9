/**
 * Peaks of a sampled curve (here: a spectrum in dB), with the definitions of scipy.signal:
 * local maxima as `find_peaks` finds them (a flat top counts once, at its middle sample),
 * prominence as `peak_prominences` defines it, width at half prominence as `peak_widths`, and
 * sub-bin refinement by quadratic interpolation (J. O. Smith, Spectral Audio Signal Processing).
 */

export interface Prominence {
  prominence: number;
  leftBase: number;
  rightBase: number;
}

/** Indices of local maxima, in increasing order. Plateaus yield their middle index (rounded down). */
export function localMaxima(x: ArrayLike<number>): number[] {
  const peaks: number[] = [];
  const last = x.length - 1;
  let i = 1;
  while (i < last) {
    const here = x[i] ?? 0;
    if ((x[i - 1] ?? 0) < here) {
      let ahead = i + 1;
      while (ahead < last && (x[ahead] ?? 0) === here) ahead++;
      if ((x[ahead] ?? 0) < here) {
        peaks.push((i + ahead - 1) >> 1);
        i = ahead;
        continue;
      }
    }
    i++;
  }
  return peaks;
}

/**
 * Prominence of the peak at index `peak`: its height above the higher of the two lowest points
 * reached on each side before the curve rises above the peak (or meets the edge). The bases are
 * the lowest points nearest the peak, as scipy reports them.
 */
export function peakProminence(x: ArrayLike<number>, peak: number): Prominence {
  const top = x[peak] ?? 0;
  let leftMin = top;
  let leftBase = peak;
  for (let i = peak; i >= 0 && (x[i] ?? 0) <= top; i--) {
    if ((x[i] ?? 0) < leftMin) {
      leftMin = x[i] ?? 0;
      leftBase = i;
    }
  }
  let rightMin = top;
  let rightBase = peak;
  for (let i = peak; i < x.length && (x[i] ?? 0) <= top; i++) {
    if ((x[i] ?? 0) < rightMin) {
      rightMin = x[i] ?? 0;
      rightBase = i;
    }
  }
  return { prominence: top - Math.max(leftMin, rightMin), leftBase, rightBase };
}

/**
 * Width in samples of a peak at `relHeight` of its prominence below the top (0.5: half
 * prominence), with linear interpolation between samples, as scipy's `peak_widths`.
 */
export function peakWidth(
  x: ArrayLike<number>,
  peak: number,
  p: Prominence,
  relHeight = 0.5,
): number {
  const height = (x[peak] ?? 0) - p.prominence * relHeight;
  let i = peak;
  while (p.leftBase < i && height < (x[i] ?? 0)) i--;
  let left = i;
  if ((x[i] ?? 0) < height) left += (height - (x[i] ?? 0)) / ((x[i + 1] ?? 0) - (x[i] ?? 0));
  i = peak;
  while (i < p.rightBase && height < (x[i] ?? 0)) i++;
  let right = i;
  if ((x[i] ?? 0) < height) right -= (height - (x[i] ?? 0)) / ((x[i - 1] ?? 0) - (x[i] ?? 0));
  return right - left;
}

/**
 * Offset in samples (−0.5..0.5) of the vertex of the parabola through three neighbouring values,
 * and the value there. On a dB spectrum this refines a peak's frequency to a fraction of a bin.
 */
export function quadraticVertex(
  before: number,
  at: number,
  after: number,
): { offset: number; value: number } {
  const curvature = before - 2 * at + after;
  if (curvature >= 0) return { offset: 0, value: at };
  const offset = (0.5 * (before - after)) / curvature;
  return { offset, value: at - 0.25 * (before - after) * offset };
}

export interface SpectralPeak {
  /** Refined frequency in Hz. */
  freqHz: number;
  /** Refined level in dB. */
  levelDb: number;
  prominenceDb: number;
  /** Width at half prominence in Hz. */
  widthHz: number;
  /** Bin index of the raw maximum. */
  bin: number;
}

export interface PeakSearch {
  /** Minimum prominence in dB. Default 6 dB. */
  minProminenceDb?: number;
  /** Only peaks at or above this frequency. Default: above DC. */
  minFreqHz?: number;
  /** Only peaks at or below this frequency. Default: Nyquist. */
  maxFreqHz?: number;
  /** Keep at most this many, most prominent first. Default 12. */
  maxPeaks?: number;
}

/**
 * Peaks of a spectrum given in dB on a uniform grid starting at 0 Hz with `binHz` spacing.
 * Prominence is measured over the whole spectrum; the frequency limits only select which peaks
 * are reported. Sorted by frequency.
 */
export function spectralPeaks(
  db: Float64Array,
  binHz: number,
  search: PeakSearch = {},
): SpectralPeak[] {
  const minProminence = search.minProminenceDb ?? 6;
  const lo = search.minFreqHz ?? binHz;
  const hi = search.maxFreqHz ?? (db.length - 1) * binHz;
  const found: SpectralPeak[] = [];
  for (const bin of localMaxima(db)) {
    const f = bin * binHz;
    if (f < lo || f > hi) continue;
    const p = peakProminence(db, bin);
    if (p.prominence < minProminence) continue;
    const v = quadraticVertex(db[bin - 1] ?? 0, db[bin] ?? 0, db[bin + 1] ?? 0);
    found.push({
      freqHz: (bin + v.offset) * binHz,
      levelDb: v.value,
      prominenceDb: p.prominence,
      widthHz: peakWidth(db, bin, p) * binHz,
      bin,
    });
  }
  found.sort((a, b) => b.prominenceDb - a.prominenceDb);
  const kept = found.slice(0, search.maxPeaks ?? 12);
  kept.sort((a, b) => a.freqHz - b.freqHz);
  return kept;
}

/**
 * Peaks standing above the spectrum's local background, for following a known resonance. The
 * background at each bin is the mean of the medians of its two flanks (from ±`relWidth`/3 to
 * ±`relWidth` of its frequency, the core left out): robust to a neighbour's skirt, and exact on
 * a straight slope (the two flank medians sit symmetrically about the bin), where a plain running
 * median would follow the slope through the peak. Then scipy-style prominence ≥ `minProminenceDb`
 * on the dB spectrum minus that background. A mode that moved onto the flank of another, or onto
 * a filter's roll-off, is a shoulder without a maximum of its own in the plain spectrum; above
 * its background it is a peak again. Only peaks within [loHz, hiHz] are searched; `levelDb` is
 * the plain spectrum's level there.
 */
export function peaksAboveLocalMedian(
  db: ArrayLike<number>,
  binHz: number,
  loHz: number,
  hiHz: number,
  minProminenceDb: number,
  relWidth = 0.12,
): SpectralPeak[] {
  const first = Math.max(1, Math.floor(loHz / binHz));
  const last = Math.min(db.length - 2, Math.ceil(hiHz / binHz));
  if (last - first < 2) return [];
  const residual = aboveLocalBackground(db, first, last, relWidth);
  const out: SpectralPeak[] = [];
  for (const i of localMaxima(residual)) {
    const p = peakProminence(residual, i);
    if (p.prominence < minProminenceDb) continue;
    const k = i + first;
    // Refined on the residual (the slope would pull the plain spectrum's vertex downhill).
    const v = quadraticVertex(residual[i - 1] ?? 0, residual[i] ?? 0, residual[i + 1] ?? 0);
    out.push({
      freqHz: (k + v.offset) * binHz,
      levelDb: (db[k] ?? 0) + v.value - (residual[i] ?? 0),
      prominenceDb: p.prominence,
      widthHz: peakWidth(residual, i, p) * binHz,
      bin: k,
    });
  }
  return out;
}

/**
 * A dB spectrum less its local background (see {@link peaksAboveLocalMedian}) over bins
 * [first, last]: element i is bin first + i.
 */
export function aboveLocalBackground(
  db: ArrayLike<number>,
  first: number,
  last: number,
  relWidth = 0.12,
): Float64Array {
  const residual = new Float64Array(Math.max(0, last - first + 1));
  const flank: number[] = [];
  const medianOf = (from: number, to: number): number => {
    flank.length = 0;
    for (let j = Math.max(0, from); j <= Math.min(db.length - 1, to); j++) {
      const v = db[j] ?? Number.NaN;
      if (Number.isFinite(v)) flank.push(v);
    }
    flank.sort((a, b) => a - b);
    return flank.length === 0 ? Number.NaN : (flank[flank.length >> 1] ?? Number.NaN);
  };
  for (let k = first; k <= last; k++) {
    const outer = Math.max(6, Math.round(k * relWidth));
    const inner = Math.max(2, Math.round(outer / 3));
    const left = medianOf(k - outer, k - inner);
    const right = medianOf(k + inner, k + outer);
    const background =
      Number.isFinite(left) && Number.isFinite(right)
        ? (left + right) / 2
        : Number.isFinite(left)
          ? left
          : right;
    residual[k - first] =
      (db[k] ?? background) - (Number.isFinite(background) ? background : (db[k] ?? 0));
  }
  return residual;
}
