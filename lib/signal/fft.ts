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
    if (!Number.isInteger(size) || size < 2 || (size & (size - 1)) !== 0) {
      throw new RangeError(`FFT length must be a power of two ≥ 2, got ${size}`);
    }
    this.size = size;
    this.bins = size / 2 + 1;
    this.fft = new FFT(size);
    this.out = new Float64Array(2 * size);
  }

  /** Writes |X_k|² into `target[0..bins)`. `frame` must hold `size` samples. */
  compute(frame: Float64Array, target: Float64Array): void {
    this.fft.realTransform(this.out, frame);
    const out = this.out;
    for (let k = 0, j = 0; k < this.bins; k++, j += 2) {
      const re = out[j] as number;
      const im = out[j + 1] as number;
      target[k] = re * re + im * im;
    }
  }
}
