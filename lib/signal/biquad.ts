/**
 * Second-order IIR sections (R. Bristow-Johnson's audio EQ cookbook forms), direct form I.
 * Used by the demo generator to shape noise and to model frame resonances, and by the order
 * tracking to keep manoeuvres out of the motor orders.
 */
export class Biquad {
  private b0: number;
  private b1: number;
  private b2: number;
  private a1: number;
  private a2: number;
  private x1 = 0;
  private x2 = 0;
  private y1 = 0;
  private y2 = 0;

  private constructor(b0: number, b1: number, b2: number, a0: number, a1: number, a2: number) {
    this.b0 = b0 / a0;
    this.b1 = b1 / a0;
    this.b2 = b2 / a0;
    this.a1 = a1 / a0;
    this.a2 = a2 / a0;
  }

  /** Band-pass with 0 dB gain at the centre frequency; Q = centre / bandwidth. */
  static bandPass(centreHz: number, q: number, sampleRateHz: number): Biquad {
    const w = (2 * Math.PI * centreHz) / sampleRateHz;
    const alpha = Math.sin(w) / (2 * q);
    return new Biquad(alpha, 0, -alpha, 1 + alpha, -2 * Math.cos(w), 1 - alpha);
  }

  /** Low-pass; q = 1/√2 gives a Butterworth section. */
  static lowPass(cornerHz: number, q: number, sampleRateHz: number): Biquad {
    const w = (2 * Math.PI * cornerHz) / sampleRateHz;
    const alpha = Math.sin(w) / (2 * q);
    const c = Math.cos(w);
    return new Biquad((1 - c) / 2, 1 - c, (1 - c) / 2, 1 + alpha, -2 * c, 1 - alpha);
  }

  /** High-pass; q = 1/√2 gives a Butterworth section. */
  static highPass(cornerHz: number, q: number, sampleRateHz: number): Biquad {
    const w = (2 * Math.PI * cornerHz) / sampleRateHz;
    const alpha = Math.sin(w) / (2 * q);
    const c = Math.cos(w);
    return new Biquad((1 + c) / 2, -(1 + c), (1 + c) / 2, 1 + alpha, -2 * c, 1 - alpha);
  }

  /**
   * Sets the state as if the input had been `x` for ever: a filter started on a signal that
   * does not begin at 0 rings less. Exact for the high-pass (its output for a constant is 0).
   */
  settle(x: number): void {
    const dcGain = (this.b0 + this.b1 + this.b2) / (1 + this.a1 + this.a2);
    this.x1 = this.x2 = x;
    this.y1 = this.y2 = x * dcGain;
  }

  step(x: number): number {
    const y =
      this.b0 * x + this.b1 * this.x1 + this.b2 * this.x2 - this.a1 * this.y1 - this.a2 * this.y2;
    this.x2 = this.x1;
    this.x1 = x;
    this.y2 = this.y1;
    this.y1 = y;
    return y;
  }
}
