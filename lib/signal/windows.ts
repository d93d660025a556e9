/**
 * Spectral windows, built DFT-even ("periodic"): w[n] for n = 0..N-1 of a window of length N+1
 * with its last sample dropped. Spectral analysis uses the periodic form; the symmetric form is for
 * filter design and has a slightly wider noise bandwidth (Heinzel et al. 2002, §6).
 */

export type WindowName = "hann" | "hamming" | "blackman-harris";

export const WINDOW_NAMES: readonly WindowName[] = ["hann", "hamming", "blackman-harris"];

/** Cosine-sum coefficients a_k of w[n] = Σ (-1)^k a_k cos(2πkn/N). */
const COSINE_SUM: Record<WindowName, readonly number[]> = {
  hann: [0.5, 0.5],
  hamming: [0.54, 0.46],
  // 4-term, −92 dB sidelobes (Harris 1978)
  "blackman-harris": [0.35875, 0.48829, 0.14128, 0.01168],
};

/** A new periodic window of `length` samples (caller owns the array). */
export function makeWindow(name: WindowName, length: number): Float64Array {
  if (!Number.isInteger(length) || length < 1) {
    throw new RangeError(`window length must be a positive integer, got ${length}`);
  }
  const coefficients = COSINE_SUM[name];
  if (!coefficients) throw new RangeError(`unknown window "${String(name)}"`);
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    let sum = 0;
    let sign = 1;
    for (let k = 0; k < coefficients.length; k++) {
      sum += sign * (coefficients[k] ?? 0) * Math.cos((2 * Math.PI * k * n) / length);
      sign = -sign;
    }
    w[n] = sum;
  }
  return w;
}

/** Window sums S1 = Σw and S2 = Σw² (Heinzel et al. notation). */
export function windowSums(w: Float64Array): { s1: number; s2: number } {
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < w.length; i++) {
    const v = w[i] ?? 0;
    s1 += v;
    s2 += v * v;
  }
  return { s1, s2 };
}

/** Equivalent noise bandwidth in bins: N·S2/S1². Multiply by fs/N for Hz. */
export function enbwBins(w: Float64Array): number {
  const { s1, s2 } = windowSums(w);
  return (w.length * s2) / (s1 * s1);
}
