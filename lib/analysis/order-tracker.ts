import { makeWindow } from "../signal/windows";

/**
 * Motor orders by computed order tracking: each motor's rotation angle is integrated from its
 * logged rpm, and the gyro signal is demodulated at k times that angle over short Hann-windowed
 * blocks. A motor's imbalance is locked to its own rotation, so near-identical motors spinning a
 * few Hz apart are told apart (block length T separates orders more than about 1/T apart), where
 * a fixed spectral window would mix them.
 *
 * Per block, the tone amplitude is A = 2·|Σ x·w·e^{−ikφ}| / Σw and its power A²/2, in (deg/s)².
 */

export interface OrderBlock {
  /** Mean throttle of the block, 0..1 (0 when there is no throttle column). */
  throttle: number;
  /** Mean rotation rate of each motor over the block, Hz. */
  rotationHz: Float64Array;
  /** power[m][o][axis] in (deg/s)². Owned by the tracker; valid during the callback. */
  power: Float64Array[][];
  tS: number;
}

export class OrderTracker {
  private readonly motors: number;
  private readonly orders: readonly number[];
  private readonly blockLength: number;
  private readonly window: Float64Array;
  private readonly windowSum: number;
  private readonly dt: number;
  private readonly maxHz: number;
  private readonly onBlock: (b: OrderBlock) => void;

  private fill = 0;
  private startS = 0;
  // Rotor phasors e^{iφ}, one per motor, advanced by each sample's rpm.
  private readonly re: Float64Array;
  private readonly im: Float64Array;
  // Accumulators [motor][order][axis] of Σ x·w·cos and Σ x·w·sin.
  private readonly sumRe: Float64Array[][];
  private readonly sumIm: Float64Array[][];
  private readonly rpmSum: Float64Array;
  private throttleSum = 0;
  private readonly result: OrderBlock;

  /**
   * @param blockSeconds coherent block length. 0.256 s (Hann main lobe ±8 Hz) separates motors
   *   spinning about 2 % apart at 400 Hz; the price is that rpm must be read to about 0.2 %
   *   (an angle error under half a turn per block).
   */
  constructor(
    sampleRateHz: number,
    motors: number,
    orders: readonly number[],
    maxHz: number,
    onBlock: (b: OrderBlock) => void,
    blockSeconds = 0.256,
  ) {
    this.motors = motors;
    this.orders = orders;
    this.dt = 1 / sampleRateHz;
    this.maxHz = maxHz;
    this.blockLength = Math.max(16, Math.round(blockSeconds * sampleRateHz));
    this.window = makeWindow("hann", this.blockLength);
    this.windowSum = this.window.reduce((s, v) => s + v, 0);
    this.onBlock = onBlock;
    this.re = new Float64Array(motors).fill(1);
    this.im = new Float64Array(motors);
    const grid = () => Array.from({ length: motors }, () => orders.map(() => new Float64Array(3)));
    this.sumRe = grid();
    this.sumIm = grid();
    this.rpmSum = new Float64Array(motors);
    this.result = { throttle: 0, rotationHz: new Float64Array(motors), power: grid(), tS: 0 };
  }

  /** Starts a new block; called at gaps so that no block spans one. */
  reset(): void {
    this.fill = 0;
    this.clear();
  }

  /** Feeds samples [0, n) of a block of the log. */
  push(
    n: number,
    timeS: Float64Array,
    gyro: readonly Float64Array[],
    throttle: Float64Array | null,
    rpm: readonly Float64Array[],
  ): void {
    const motors = this.motors;
    const orders = this.orders;
    const w = this.window;
    const g0 = gyro[0] as Float64Array;
    const g1 = gyro[1] as Float64Array;
    const g2 = gyro[2] as Float64Array;
    for (let i = 0; i < n; i++) {
      if (this.fill === 0) this.startS = timeS[i] ?? 0;
      const wi = w[this.fill] ?? 0;
      const x0 = (g0[i] ?? 0) * wi;
      const x1 = (g1[i] ?? 0) * wi;
      const x2 = (g2[i] ?? 0) * wi;
      this.throttleSum += throttle ? (throttle[i] ?? 0) : 0;
      for (let m = 0; m < motors; m++) {
        const r = (rpm[m] as Float64Array)[i] ?? 0;
        this.rpmSum[m] = (this.rpmSum[m] ?? 0) + r;
        // e^{ikφ} for k = 1, 2, 3… by repeated complex multiplication of the rotor phasor.
        const c1 = this.re[m] ?? 1;
        const s1 = this.im[m] ?? 0;
        let ck = 1;
        let sk = 0;
        let k = 0;
        const reRow = this.sumRe[m] as Float64Array[];
        const imRow = this.sumIm[m] as Float64Array[];
        for (let o = 0; o < orders.length; o++) {
          const target = orders[o] ?? 1;
          while (k < target) {
            const c = ck * c1 - sk * s1;
            sk = sk * c1 + ck * s1;
            ck = c;
            k++;
          }
          const re = reRow[o] as Float64Array;
          const im = imRow[o] as Float64Array;
          re[0] = (re[0] ?? 0) + x0 * ck;
          re[1] = (re[1] ?? 0) + x1 * ck;
          re[2] = (re[2] ?? 0) + x2 * ck;
          im[0] = (im[0] ?? 0) + x0 * sk;
          im[1] = (im[1] ?? 0) + x1 * sk;
          im[2] = (im[2] ?? 0) + x2 * sk;
        }
        // Advance the rotor angle by this sample's rotation.
        const dphi = (2 * Math.PI * r * this.dt) / 60;
        const cd = Math.cos(dphi);
        const sd = Math.sin(dphi);
        this.re[m] = c1 * cd - s1 * sd;
        this.im[m] = s1 * cd + c1 * sd;
      }
      this.fill++;
      if (this.fill === this.blockLength) this.emit();
    }
  }

  private emit(): void {
    const n = this.blockLength;
    const out = this.result;
    out.tS = this.startS;
    out.throttle = this.throttleSum / n;
    const scale = 2 / (this.windowSum * this.windowSum);
    for (let m = 0; m < this.motors; m++) {
      const f1 = (this.rpmSum[m] ?? 0) / n / 60;
      out.rotationHz[m] = f1;
      // Keep the phasor on the unit circle despite rounding.
      const mag = Math.hypot(this.re[m] ?? 1, this.im[m] ?? 0) || 1;
      this.re[m] = (this.re[m] ?? 1) / mag;
      this.im[m] = (this.im[m] ?? 0) / mag;
      for (let o = 0; o < this.orders.length; o++) {
        const p = out.power[m]?.[o] as Float64Array;
        const re = this.sumRe[m]?.[o] as Float64Array;
        const im = this.sumIm[m]?.[o] as Float64Array;
        const above = f1 * (this.orders[o] ?? 1) > this.maxHz;
        for (let a = 0; a < 3; a++) {
          p[a] = above ? Number.NaN : scale * ((re[a] ?? 0) ** 2 + (im[a] ?? 0) ** 2);
        }
      }
    }
    this.onBlock(out);
    this.fill = 0;
    this.clear();
  }

  private clear(): void {
    this.throttleSum = 0;
    this.rpmSum.fill(0);
    for (const row of this.sumRe) for (const a of row) a.fill(0);
    for (const row of this.sumIm) for (const a of row) a.fill(0);
  }
}
