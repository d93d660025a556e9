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
export function peakWidth(x: ArrayLike<number>, peak: number, p: Prominence, relHeight = 0.5): number {
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
export function quadraticVertex(before: number, at: number, after: number): { offset: number; value: number } {
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
export function spectralPeaks(db: Float64Array, binHz: number, search: PeakSearch = {}): SpectralPeak[] {
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
 * Peaks standing above the spectrum's local median, for following a known resonance: the dB
 * spectrum minus its running median over ±`relWidth` of each frequency (a robust local
 * background, as a median filter removes a slope or a neighbour's skirt but keeps a narrow
 * tone), then scipy-style prominence ≥ `minProminenceDb` on that residual. A mode that moved
 * onto the flank of another, or onto a filter's roll-off, is a shoulder without a maximum of its
 * own in the plain spectrum; above the local median it is a peak again. Only peaks within
 * [loHz, hiHz] are searched; `levelDb` is the plain spectrum's level there.
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
  const residual = new Float64Array(last - first + 1);
  const window: number[] = [];
  for (let k = first; k <= last; k++) {
    const half = Math.max(3, Math.round(k * relWidth));
    window.length = 0;
    for (let j = Math.max(0, k - half); j <= Math.min(db.length - 1, k + half); j++) {
      const v = db[j] ?? Number.NaN;
      if (Number.isFinite(v)) window.push(v);
    }
    window.sort((a, b) => a - b);
    const med = window.length === 0 ? 0 : (window[window.length >> 1] ?? 0);
    residual[k - first] = (db[k] ?? med) - med;
  }
  const out: SpectralPeak[] = [];
  for (const i of localMaxima(residual)) {
    const p = peakProminence(residual, i);
    if (p.prominence < minProminenceDb) continue;
    const k = i + first;
    const v = quadraticVertex(db[k - 1] ?? 0, db[k] ?? 0, db[k + 1] ?? 0);
    out.push({ freqHz: (k + v.offset) * binHz, levelDb: v.value, prominenceDb: p.prominence, widthHz: peakWidth(residual, i, p) * binHz, bin: k });
  }
  return out;
}
