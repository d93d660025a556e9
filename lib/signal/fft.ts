import FFT from "fft.js";

/**
 * Squared magnitudes |X_k|² of the DFT of a real frame, for k = 0..N/2, using fft.js's real
 * transform. One instance per frame length; it owns its scratch buffers, so it is not re-entrant.
 */
export class RealPowerSpectrum {
  readonly size: number;
  readonly bins: number;
  private readonly fft: FFT;
  private readonly out: Float64Array;

  constructor(size: number) {
    this.fft = checkedFft(size);
    this.size = size;
    this.bins = size / 2 + 1;
    this.out = new Float64Array(2 * size);
  }

  /** Writes |X_k|² into `target[0..bins)`. `frame` must hold `size` samples. */
  compute(frame: Float64Array, target: Float64Array): void {
    this.fft.realTransform(this.out, frame);
    squaredMagnitudes(this.out, target, this.bins);
  }
}

/**
 * Squared magnitudes |X_k|² of the DFT of a complex sequence, k = 0..N−1, zero-padded to the
 * transform length (fft.js's complex transform). One instance per length; not re-entrant.
 */
export class ComplexPowerSpectrum {
  readonly size: number;
  private readonly fft: FFT;
  private readonly input: Float64Array;
  private readonly out: Float64Array;
  private readonly power: Float64Array;

  constructor(size: number) {
    this.fft = checkedFft(size);
    this.size = size;
    this.power = new Float64Array(size);
    this.input = new Float64Array(2 * size);
    this.out = new Float64Array(2 * size);
  }

  /**
   * |X_k|², k = 0..size−1, of the sequence re[offset + i·stride] + i·im[offset + i·stride],
   * i < count (count ≤ size; the rest is zero). The returned buffer is owned by this instance
   * and overwritten by the next call.
   */
  powers(
    re: ArrayLike<number>,
    im: ArrayLike<number>,
    count: number,
    stride = 1,
    offset = 0,
  ): Float64Array {
    const x = this.input;
    x.fill(0);
    for (let i = 0; i < count; i++) {
      x[2 * i] = re[offset + i * stride] ?? 0;
      x[2 * i + 1] = im[offset + i * stride] ?? 0;
    }
    this.fft.transform(this.out, x);
    squaredMagnitudes(this.out, this.power, this.size);
    return this.power;
  }
}

/** fft.js's transform for `size` points, after checking the size once for both spectra. */
function checkedFft(size: number): FFT {
  if (!Number.isInteger(size) || size < 2 || (size & (size - 1)) !== 0) {
    throw new RangeError(`FFT length must be a power of two ≥ 2, got ${size}`);
  }
  return new FFT(size);
}

/** target[k] = re² + im² of the interleaved complex values (out[2k], out[2k+1]), k < count. */
function squaredMagnitudes(out: Float64Array, target: Float64Array, count: number): void {
  for (let k = 0, j = 0; k < count; k++, j += 2) {
    const re = out[j] ?? 0;
    const im = out[j + 1] ?? 0;
    target[k] = re * re + im * im;
  }
}
