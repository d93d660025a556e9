/**
 * Filters of the simulated flight controller and of the simulated airframe, at the controller's
 * loop rate. The low-pass and notch biquads are R. Bristow-Johnson's "Cookbook formulae for audio
 * EQ biquad filter coefficients" (the Audio EQ Cookbook); the first-order low-pass is the usual
 * one-pole smoother y += k·(x − y); the frame's resonances are second-order resonators whose poles
 * are placed exactly where the continuous oscillator's are (matched pole–zero mapping).
 *
 * These live apart from lib/signal/biquad.ts on purpose: a notch that follows a motor's rotation
 * needs its coefficients changed every loop, and one coefficient set serves three gyro axes.
 */

/** First-order low-pass y[n] = y[n−1] + k·(x[n] − y[n−1]), k = Δt/(RC + Δt), RC = 1/(2π·fc). */
export class OnePoleLowPass {
  private readonly k: number;
  private y = 0;

  constructor(cornerHz: number, sampleRateHz: number) {
    const dt = 1 / sampleRateHz;
    const rc = 1 / (2 * Math.PI * cornerHz);
    this.k = dt / (rc + dt);
  }

  /** |H(e^{jω})|² of this filter at f Hz, closed form: k² / (1 − 2(1−k)·cos ω + (1−k)²). */
  static powerGain(cornerHz: number, sampleRateHz: number, freqHz: number): number {
    const dt = 1 / sampleRateHz;
    const k = dt / (1 / (2 * Math.PI * cornerHz) + dt);
    const w = (2 * Math.PI * freqHz) / sampleRateHz;
    const p = 1 - k;
    return (k * k) / (1 - 2 * p * Math.cos(w) + p * p);
  }

  step(x: number): number {
    this.y += this.k * (x - this.y);
    return this.y;
  }
}

/** Normalised biquad coefficients (a0 = 1): y = b0·x + b1·x1 + b2·x2 − a1·y1 − a2·y2. */
export interface BiquadCoefficients {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/**
 * The cookbook's shared terms at ω = 2πf/fs: cos ω, a0 = 1 + α with α = sin ω / 2Q, and the
 * normalised feedback coefficients a1 = −2 cos ω / a0, a2 = (1 − α) / a0 (the same for the
 * low-pass and the notch; only the numerators differ).
 */
function cookbookPoles(freqHz: number, q: number, sampleRateHz: number) {
  const w = (2 * Math.PI * freqHz) / sampleRateHz;
  const alpha = Math.sin(w) / (2 * q);
  const c = Math.cos(w);
  const a0 = 1 + alpha;
  return { c, a0, a1: (-2 * c) / a0, a2: (1 - alpha) / a0 };
}

/** Cookbook low-pass; q = 1/√2 is a second-order Butterworth section (−3 dB at the corner). */
export function lowPassCoefficients(
  cornerHz: number,
  q: number,
  sampleRateHz: number,
): BiquadCoefficients {
  const { c, a0, a1, a2 } = cookbookPoles(cornerHz, q, sampleRateHz);
  return {
    b0: (1 - c) / 2 / a0,
    b1: (1 - c) / a0,
    b2: (1 - c) / 2 / a0,
    a1,
    a2,
  };
}

/** Cookbook notch: zero gain at the centre, Q = centre / bandwidth (bandwidth between the −3 dB points). */
export function notchCoefficients(
  centreHz: number,
  q: number,
  sampleRateHz: number,
): BiquadCoefficients {
  const { c, a0, a1, a2 } = cookbookPoles(centreHz, q, sampleRateHz);
  return { b0: 1 / a0, b1: (-2 * c) / a0, b2: 1 / a0, a1, a2 };
}

/** |H(e^{jω})|² of a biquad at f Hz, evaluated from its coefficients. */
export function biquadPowerGain(
  c: BiquadCoefficients,
  sampleRateHz: number,
  freqHz: number,
): number {
  const w = (2 * Math.PI * freqHz) / sampleRateHz;
  const re = (b0: number, b1: number, b2: number) => b0 + b1 * Math.cos(w) + b2 * Math.cos(2 * w);
  const im = (b1: number, b2: number) => -(b1 * Math.sin(w) + b2 * Math.sin(2 * w));
  const nr = re(c.b0, c.b1, c.b2);
  const ni = im(c.b1, c.b2);
  const dr = re(1, c.a1, c.a2);
  const di = im(c.a1, c.a2);
  return (nr * nr + ni * ni) / (dr * dr + di * di);
}

/**
 * Biquads applied to several channels (the three gyro axes) with shared coefficients that may be
 * changed between samples: direct form I, so a coefficient change leaves no stored state to rescale.
 */
export class BiquadBank {
  readonly channels: number;
  private c: BiquadCoefficients;
  private readonly state: Float64Array;

  constructor(coefficients: BiquadCoefficients, channels: number) {
    this.c = coefficients;
    this.channels = channels;
    this.state = new Float64Array(4 * channels);
  }

  set(coefficients: BiquadCoefficients): void {
    this.c = coefficients;
  }

  step(channel: number, x: number): number {
    const s = this.state;
    const i = 4 * channel;
    const x1 = s[i] as number;
    const x2 = s[i + 1] as number;
    const y1 = s[i + 2] as number;
    const y2 = s[i + 3] as number;
    const c = this.c;
    const y = c.b0 * x + c.b1 * x1 + c.b2 * x2 - c.a1 * y1 - c.a2 * y2;
    s[i + 1] = x1;
    s[i] = x;
    s[i + 3] = y1;
    s[i + 2] = y;
    return y;
  }
}

/**
 * One structural mode: the rate response of a damped oscillator of natural frequency fn and damping
 * ratio ζ to a force, H(s) ∝ s / (s² + 2ζωn·s + ωn²). Its power response peaks at fn exactly and its
 * half-power bandwidth is 2ζ·fn (the velocity response of a single-degree-of-freedom oscillator;
 * Thomson, Theory of Vibration with Applications, ch. 3). The poles are mapped exactly,
 * z = exp(s·Δt); zeros at z = ±1 keep the band-pass shape; the gain is set to 1 at fn.
 */
export class ModalResonator {
  /** Feedback coefficients and the gain that makes the response 1 at fn. */
  private readonly c: { a1: number; a2: number; g: number };
  private x1 = 0;
  private x2 = 0;
  private y1 = 0;
  private y2 = 0;

  constructor(naturalHz: number, dampingRatio: number, sampleRateHz: number) {
    const dt = 1 / sampleRateHz;
    const wn = 2 * Math.PI * naturalHz;
    const r = Math.exp(-dampingRatio * wn * dt);
    const theta = wn * Math.sqrt(Math.max(0, 1 - dampingRatio * dampingRatio)) * dt;
    const a1 = -2 * r * Math.cos(theta);
    const a2 = r * r;
    // Unit gain at fn: evaluate (1 − z⁻²)/(1 + a1 z⁻¹ + a2 z⁻²) there and divide it out.
    const w = wn * dt;
    const nr = 1 - Math.cos(2 * w);
    const ni = Math.sin(2 * w);
    const dr = 1 + a1 * Math.cos(w) + a2 * Math.cos(2 * w);
    const di = -(a1 * Math.sin(w) + a2 * Math.sin(2 * w));
    this.c = { a1, a2, g: Math.sqrt((dr * dr + di * di) / (nr * nr + ni * ni)) };
  }

  step(x: number): number {
    const { a1, a2, g } = this.c;
    const y = g * (x - this.x2) - a1 * this.y1 - a2 * this.y2;
    this.x2 = this.x1;
    this.x1 = x;
    this.y2 = this.y1;
    this.y1 = y;
    return y;
  }
}
