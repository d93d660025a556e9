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
    if (orders.length !== 3 || orders[0] !== 1 || orders[1] !== 2 || !Number.isInteger(orders[2]) || !((orders[2] ?? 0) >= 2)) {
      throw new RangeError("the order tracker follows orders 1, 2 and a whole blade-pass order of 2 or more");
    }
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
    let i = 0;
    while (i < n) {
      if (this.fill === 0) this.startS = timeS[i] ?? 0;
      const run = Math.min(n - i, this.blockLength - this.fill);
      if (throttle) for (let j = i; j < i + run; j++) this.throttleSum += throttle[j] ?? 0;
      for (let m = 0; m < this.motors; m++) this.accumulate(m, i, run, gyro, rpm[m] as Float64Array);
      this.fill += run;
      i += run;
      if (this.fill === this.blockLength) this.emit();
    }
  }

  /**
   * One motor over samples [from, from+run) of the current block. The sums live in local variables
   * (the hot path: motors × orders × axes per sample) and are stored once per run.
   */
  private accumulate(m: number, from: number, run: number, gyro: readonly Float64Array[], rpm: Float64Array): void {
    const w = this.window;
    const g0 = gyro[0] as Float64Array;
    const g1 = gyro[1] as Float64Array;
    const g2 = gyro[2] as Float64Array;
    const orders = this.orders;
    const k3 = orders[2] ?? 3;
    const radPerRpmSample = (2 * Math.PI * this.dt) / 60;
    let c1 = this.re[m] ?? 1;
    let s1 = this.im[m] ?? 0;
    let rpmSum = 0;
    let r10 = 0, r11 = 0, r12 = 0, i10 = 0, i11 = 0, i12 = 0;
    let r20 = 0, r21 = 0, r22 = 0, i20 = 0, i21 = 0, i22 = 0;
    let r30 = 0, r31 = 0, r32 = 0, i30 = 0, i31 = 0, i32 = 0;
    let f = this.fill;
    for (let j = from; j < from + run; j++, f++) {
      const wi = w[f] ?? 0;
      const x0 = (g0[j] ?? 0) * wi;
      const x1 = (g1[j] ?? 0) * wi;
      const x2 = (g2[j] ?? 0) * wi;
      // e^{i2φ} and e^{ikφ} by complex multiplication of the rotor phasor e^{iφ}.
      const c2 = c1 * c1 - s1 * s1;
      const s2 = 2 * c1 * s1;
      let c3 = c2;
      let s3 = s2;
      for (let k = 2; k < k3; k++) {
        const c = c3 * c1 - s3 * s1;
        s3 = s3 * c1 + c3 * s1;
        c3 = c;
      }
      r10 += x0 * c1; r11 += x1 * c1; r12 += x2 * c1;
      i10 += x0 * s1; i11 += x1 * s1; i12 += x2 * s1;
      r20 += x0 * c2; r21 += x1 * c2; r22 += x2 * c2;
      i20 += x0 * s2; i21 += x1 * s2; i22 += x2 * s2;
      r30 += x0 * c3; r31 += x1 * c3; r32 += x2 * c3;
      i30 += x0 * s3; i31 += x1 * s3; i32 += x2 * s3;
      const r = rpm[j] ?? 0;
      rpmSum += r;
      // Advance the rotor angle by this sample's rotation. Taylor series to x⁸/x⁹: below 1e-6
      // error for steps up to 1 rad (≈ 640 Hz at 4 kHz), much cheaper than Math.cos/sin; the
      // phasor is renormalised every block.
      const dphi = r * radPerRpmSample;
      const q = dphi * dphi;
      const cd = 1 - (q / 2) * (1 - (q / 12) * (1 - (q / 30) * (1 - q / 56)));
      const sd = dphi * (1 - (q / 6) * (1 - (q / 20) * (1 - (q / 42) * (1 - q / 72))));
      const c = c1 * cd - s1 * sd;
      s1 = s1 * cd + c1 * sd;
      c1 = c;
    }
    this.re[m] = c1;
    this.im[m] = s1;
    this.rpmSum[m] = (this.rpmSum[m] ?? 0) + rpmSum;
    const re = this.sumRe[m] as Float64Array[];
    const im = this.sumIm[m] as Float64Array[];
    add3(re[0] as Float64Array, r10, r11, r12);
    add3(im[0] as Float64Array, i10, i11, i12);
    add3(re[1] as Float64Array, r20, r21, r22);
    add3(im[1] as Float64Array, i20, i21, i22);
    add3(re[2] as Float64Array, r30, r31, r32);
    add3(im[2] as Float64Array, i30, i31, i32);
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

function add3(target: Float64Array, a: number, b: number, c: number): void {
  target[0] = (target[0] ?? 0) + a;
  target[1] = (target[1] ?? 0) + b;
  target[2] = (target[2] ?? 0) + c;
}
