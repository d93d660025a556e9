import { ComplexPowerSpectrum } from "../signal/fft";
import { makeWindow } from "../signal/windows";

/**
 * Motor orders by computed order tracking: each motor's rotation angle is integrated from its
 * logged rpm, and the gyro signal is demodulated at q times that angle over short Hann-windowed
 * blocks, for every tracked order q (whole and half orders, so the order spectrum between the
 * whole orders is seen too). A motor's imbalance is locked to its own rotation, so near-identical
 * motors spinning a few Hz apart are told apart (block length T separates orders more than about
 * 1/T apart), where a fixed spectral window would mix them.
 *
 * Per block, the tone amplitude is A = 2·|Σ x·w·e^{−iqφ}| / Σw and its power A²/2, in (deg/s)².
 *
 * Between the tracked orders: every order's demodulated sum is cut into sub-blocks of two
 * revolutions of that motor (which puts the neighbouring tracked orders, 0.5 apart, in the nulls
 * of each sub-block's boxcar), and a zero-padded DFT across the sub-blocks gives the order
 * spectrum within ±0.25 of the order at about 1/(2·revolutions per block) resolution, still
 * locked to the motor's own angle. So the order spectrum is covered from 0.25× to 4.25×: a whole
 * order reports its exact level (the DFT's zero bin, the plain coherent sum) and, as `side`, the
 * strongest tone from just outside the block window's main lobe to 0.25 orders away (sidebands); a half order reports the strongest tone in
 * its band (a bearing's tones fall at non-integer orders that no fixed order would hit).
 *
 * Telemetry that cannot be true is not integrated into a level: per motor and per block, rpm
 * that is 0 (a dropout), outside the plausible range, stuck at one value while the other motors'
 * telemetry moves, or changing faster than a motor can accelerate masks that motor's block.
 */

/**
 * Why a motor's block was not measured: rpm 0, outside the plausible range, stuck while the other
 * motors' telemetry moves, changing faster than a motor can.
 */
export const MASK_REASONS = ["zero", "range", "stuck", "slew"] as const;
export type MaskReason = (typeof MASK_REASONS)[number];

export interface TelemetryLimits {
  /** Lowest and highest believable mechanical rpm of a spinning motor. */
  minRpm: number;
  maxRpm: number;
  /** Fastest believable change of rpm, rev/min per second. */
  maxSlewRpmPerS: number;
}

export interface OrderBlock {
  /** Mean throttle of the block, 0..1 (0 when there is no throttle column). */
  throttle: number;
  /** Mean rotation rate of each motor over the block, Hz (NaN when masked). */
  rotationHz: Float64Array;
  /** Why each motor's block is masked, or null when it was measured. */
  masked: (MaskReason | null)[];
  /**
   * power[m][o][axis] in (deg/s)²; NaN when the motor is masked or the order's frequency lies
   * outside the trusted range. Owned by the tracker; valid during the callback.
   */
  power: Float64Array[][];
  /** Whole orders: the strongest tone beside it (outside its main lobe, up to 0.25 orders away), (deg/s)² (NaN for half orders). */
  side: Float64Array[][];
  tS: number;
}

/**
 * Half-width of the core of an order's main lobe whose energy is its level, in bins of the
 * block's DFT. 0 (the exact coherent sum) keeps motors spinning 2 % apart (two bins at 400 Hz)
 * apart; a wider core would keep the level of a tone a little off the logged rpm (late or noisy
 * telemetry) but lets a near-identical motor's tone in: measured on the demo and the simulator's
 * matrix, the exact sum named the right motor more often.
 */
const LOBE_CORE_BINS = 0;

const ZERO = 1;
const RANGE = 2;
const SLEW = 4;

export class OrderTracker {
  private readonly motors: number;
  private readonly orders: readonly number[];
  /** For each half-order step h = 1..H (order h/2), the slot of its sums, or −1. */
  private readonly slotOfHalf: Int32Array;
  private readonly halves: number;
  private readonly blockLength: number;
  private readonly window: Float64Array;
  private readonly windowSum: number;
  private readonly dt: number;
  private readonly minHz: number;
  private readonly maxHz: number;
  private readonly limits: TelemetryLimits;
  private readonly onBlock: (b: OrderBlock) => void;

  private fill = 0;
  private startS = 0;
  /** Samples since the start (for the slew check across blocks). */
  private sampleIndex = 0;
  // Half-angle rotor phasors e^{iφ/2}, one per motor, advanced by each sample's rpm.
  private readonly re: Float64Array;
  private readonly im: Float64Array;
  // Accumulators [motor][slot·3 + axis] of Σ x·w·cos and Σ x·w·sin.
  private readonly sumRe: Float64Array[];
  private readonly sumIm: Float64Array[];
  private readonly rpmSum: Float64Array;
  /** Per motor: flags of this block (ZERO | RANGE | SLEW), whether its value changed in it. */
  private readonly flags: Int32Array;
  private readonly changed: Uint8Array;
  /** Per motor: the last rpm value and the sample index at which it last changed. */
  private readonly lastRpm: Float64Array;
  private readonly lastChange: Float64Array;
  private throttleSum = 0;
  private readonly result: OrderBlock;
  /** Slots whose sums are cut into two-revolution sub-blocks (every order). */
  private readonly halfSlots: Int32Array;
  /** Per motor: angle since the current sub-block began (rad), sub-blocks stored so far. */
  private readonly subAngle: Float64Array;
  private readonly subCount: Int32Array;
  /** Per motor: stored sub-block sums [sub · halfSlots·3 + k·3 + axis]. */
  private readonly subRe: Float64Array[];
  private readonly subIm: Float64Array[];
  /** Per motor: Σ window of the current sub-block, and of each stored one. */
  private readonly subWeightNow: Float64Array;
  private readonly subWeight: Float64Array[];
  private readonly zeros: Float64Array;
  private readonly maxSubs: number;
  /** Zoom transforms by length (twice the sub-blocks of a block, rounded up to a power of two). */
  private readonly zooms = new Map<number, ComplexPowerSpectrum>();

  /**
   * @param orders tracked orders, multiples of 0.5 (e.g. 0.5, 1, 1.5 … 4 and the blade pass).
   * @param minHz, maxHz an order is measured only where its frequency lies in this range.
   * @param blockSeconds coherent block length. 0.256 s (Hann main lobe ±8 Hz) separates motors
   *   spinning about 2 % apart at 400 Hz; the price is that rpm must be read to about 0.2 %
   *   (an angle error under half a turn per block).
   */
  constructor(
    sampleRateHz: number,
    motors: number,
    orders: readonly number[],
    minHz: number,
    maxHz: number,
    limits: TelemetryLimits,
    onBlock: (b: OrderBlock) => void,
    blockSeconds = 0.256,
  ) {
    if (orders.length === 0 || orders.some((q) => !(q > 0) || !Number.isInteger(2 * q))) {
      throw new RangeError("the order tracker follows orders that are positive multiples of 0.5");
    }
    this.motors = motors;
    this.orders = orders;
    this.halves = Math.max(...orders.map((q) => Math.round(2 * q)));
    this.slotOfHalf = new Int32Array(this.halves + 1).fill(-1);
    orders.forEach((q, slot) => (this.slotOfHalf[Math.round(2 * q)] = slot));
    this.dt = 1 / sampleRateHz;
    this.minHz = minHz;
    this.maxHz = maxHz;
    this.limits = limits;
    this.blockLength = Math.max(16, Math.round(blockSeconds * sampleRateHz));
    this.window = makeWindow("hann", this.blockLength);
    this.windowSum = this.window.reduce((s, v) => s + v, 0);
    this.onBlock = onBlock;
    this.re = new Float64Array(motors).fill(1);
    this.im = new Float64Array(motors);
    this.sumRe = Array.from({ length: motors }, () => new Float64Array(orders.length * 3));
    this.sumIm = Array.from({ length: motors }, () => new Float64Array(orders.length * 3));
    this.rpmSum = new Float64Array(motors);
    this.flags = new Int32Array(motors);
    this.changed = new Uint8Array(motors);
    this.lastRpm = new Float64Array(motors).fill(Number.NaN);
    this.lastChange = new Float64Array(motors);
    this.halfSlots = Int32Array.from(orders.map((_, slot) => slot));
    // At the top believable rotation a block holds this many two-revolution sub-blocks.
    this.maxSubs = Math.ceil((this.blockLength * this.dt * limits.maxRpm) / 60 / 2) + 2;
    this.subAngle = new Float64Array(motors);
    this.subCount = new Int32Array(motors);
    const subs = this.maxSubs * this.halfSlots.length * 3;
    this.subRe = Array.from({ length: motors }, () => new Float64Array(subs));
    this.subIm = Array.from({ length: motors }, () => new Float64Array(subs));
    this.subWeightNow = new Float64Array(motors);
    this.subWeight = Array.from({ length: motors }, () => new Float64Array(this.maxSubs));
    this.zeros = new Float64Array(this.maxSubs);
    this.result = {
      throttle: 0,
      rotationHz: new Float64Array(motors),
      masked: Array.from({ length: motors }, () => null),
      power: Array.from({ length: motors }, () => orders.map(() => new Float64Array(3))),
      side: Array.from({ length: motors }, () => orders.map(() => new Float64Array(3))),
      tS: 0,
    };
  }

  /** Starts a new block; called at gaps so that no block spans one. */
  reset(): void {
    this.fill = 0;
    this.lastRpm.fill(Number.NaN);
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
      for (let m = 0; m < this.motors; m++)
        this.accumulate(m, i, run, gyro, rpm[m] as Float64Array);
      this.fill += run;
      this.sampleIndex += run;
      i += run;
      if (this.fill === this.blockLength) this.emit();
    }
  }

  /**
   * One motor over samples [from, from+run) of the current block: the hot path (motors × orders
   * × axes per sample). The phasor, the rpm checks and the sum of rpm live in local variables.
   */
  private accumulate(
    m: number,
    from: number,
    run: number,
    gyro: readonly Float64Array[],
    rpm: Float64Array,
  ): void {
    const w = this.window;
    const g0 = gyro[0] as Float64Array;
    const g1 = gyro[1] as Float64Array;
    const g2 = gyro[2] as Float64Array;
    const sr = this.sumRe[m] as Float64Array;
    const si = this.sumIm[m] as Float64Array;
    const slots = this.slotOfHalf;
    const halves = this.halves;
    const radPerRpmSampleHalf = (Math.PI * this.dt) / 60;
    const { minRpm, maxRpm, maxSlewRpmPerS } = this.limits;
    const maxStep = maxSlewRpmPerS * this.dt;
    let hc = this.re[m] ?? 1;
    let hs = this.im[m] ?? 0;
    let rpmSum = 0;
    let flags = this.flags[m] ?? 0;
    let changed = this.changed[m] ?? 0;
    let last = this.lastRpm[m] ?? Number.NaN;
    let lastChange = this.lastChange[m] ?? 0;
    let f = this.fill;
    let index = this.sampleIndex;
    let angle = this.subAngle[m] ?? 0;
    let weight = this.subWeightNow[m] ?? 0;
    const hasHalves = this.halfSlots.length > 0;
    for (let j = from; j < from + run; j++, f++, index++) {
      const wi = w[f] as number;
      weight += wi;
      const x0 = (g0[j] as number) * wi;
      const x1 = (g1[j] as number) * wi;
      const x2 = (g2[j] as number) * wi;
      // e^{ihφ/2} for h = 1..H by complex multiplication of the half-angle phasor.
      let c = hc;
      let s = hs;
      for (let h = 1; h <= halves; h++) {
        if (h > 1) {
          const cn = c * hc - s * hs;
          s = s * hc + c * hs;
          c = cn;
        }
        const slot = slots[h] as number;
        if (slot < 0) continue;
        const b = slot * 3;
        sr[b] = (sr[b] as number) + x0 * c;
        sr[b + 1] = (sr[b + 1] as number) + x1 * c;
        sr[b + 2] = (sr[b + 2] as number) + x2 * c;
        si[b] = (si[b] as number) + x0 * s;
        si[b + 1] = (si[b + 1] as number) + x1 * s;
        si[b + 2] = (si[b + 2] as number) + x2 * s;
      }
      const r = rpm[j] as number;
      rpmSum += r;
      if (!(r > 0)) flags |= ZERO;
      else if (r < minRpm || r > maxRpm) flags |= RANGE;
      if (r !== last) {
        // Telemetry is held between updates: the rate of change is judged over the time since
        // the value last changed, not over one sample.
        if (last === last && Math.abs(r - last) > maxStep * (index - lastChange)) flags |= SLEW;
        last = r;
        lastChange = index;
        changed = 1;
      }
      // Advance the half angle by half this sample's rotation. Taylor series to x⁸/x⁹: below
      // 1e-6 error for steps up to 1 rad, much cheaper than Math.cos/sin; the phasor is
      // renormalised every block.
      const dphi = r * radPerRpmSampleHalf;
      const q = dphi * dphi;
      const cd = 1 - (q / 2) * (1 - (q / 12) * (1 - (q / 30) * (1 - q / 56)));
      const sd = dphi * (1 - (q / 6) * (1 - (q / 20) * (1 - (q / 42) * (1 - q / 72))));
      const cn = hc * cd - hs * sd;
      hs = hs * cd + hc * sd;
      hc = cn;
      angle += 2 * dphi;
      if (hasHalves && angle >= 4 * Math.PI) {
        angle -= 4 * Math.PI;
        this.subWeightNow[m] = weight;
        this.flushSub(m);
        weight = 0;
      }
    }
    this.subAngle[m] = angle;
    this.subWeightNow[m] = weight;
    this.re[m] = hc;
    this.im[m] = hs;
    this.rpmSum[m] = (this.rpmSum[m] ?? 0) + rpmSum;
    this.flags[m] = flags;
    this.changed[m] = changed;
    this.lastRpm[m] = last;
    this.lastChange[m] = lastChange;
  }

  /** Zero-padded twice over (scalloping under 1 dB), at least 16 points. */
  private zoomFor(subs: number): ComplexPowerSpectrum {
    const n = Math.max(16, nextPow2(2 * subs));
    let z = this.zooms.get(n);
    if (!z) {
      z = new ComplexPowerSpectrum(n);
      this.zooms.set(n, z);
    }
    return z;
  }

  /** Moves the half orders' running sums of motor m into its next sub-block. */
  private flushSub(m: number): void {
    const j = this.subCount[m] ?? 0;
    const sr = this.sumRe[m] as Float64Array;
    const si = this.sumIm[m] as Float64Array;
    const width = this.halfSlots.length * 3;
    // More sub-blocks than a believable rpm allows: the motor is masked anyway (range); keep
    // summing into the last one.
    const into = Math.min(j, this.maxSubs - 1);
    const weights = this.subWeight[m] as Float64Array;
    weights[into] = (weights[into] ?? 0) + (this.subWeightNow[m] ?? 0);
    this.subWeightNow[m] = 0;
    const dr = this.subRe[m] as Float64Array;
    const di = this.subIm[m] as Float64Array;
    for (let k = 0; k < this.halfSlots.length; k++) {
      const slot = this.halfSlots[k] as number;
      for (let a = 0; a < 3; a++) {
        const b = slot * 3 + a;
        const t = into * width + k * 3 + a;
        dr[t] = (dr[t] as number) + (sr[b] as number);
        di[t] = (di[t] as number) + (si[b] as number);
        sr[b] = 0;
        si[b] = 0;
      }
    }
    this.subCount[m] = Math.min(j + 1, this.maxSubs);
  }

  private emit(): void {
    const len = this.blockLength;
    const out = this.result;
    out.tS = this.startS;
    out.throttle = this.throttleSum / len;
    const scale = 2 / (this.windowSum * this.windowSum);
    // A value that never changes over a whole block while another motor's does is stuck
    // telemetry (a motor in flight never holds its speed to the last rpm for a quarter second).
    const anyChanged = this.changed.some((c) => c === 1);
    for (let m = 0; m < this.motors; m++) {
      const flags = this.flags[m] ?? 0;
      const reason: MaskReason | null =
        flags & ZERO
          ? "zero"
          : flags & RANGE
            ? "range"
            : flags & SLEW
              ? "slew"
              : anyChanged && this.changed[m] === 0
                ? "stuck"
                : null;
      out.masked[m] = reason;
      const f1 = reason ? Number.NaN : (this.rpmSum[m] ?? 0) / len / 60;
      out.rotationHz[m] = f1;
      // Keep the phasor on the unit circle despite rounding.
      const mag = Math.hypot(this.re[m] ?? 1, this.im[m] ?? 0) || 1;
      this.re[m] = (this.re[m] ?? 1) / mag;
      this.im[m] = (this.im[m] ?? 0) / mag;
      if (this.halfSlots.length > 0 && (this.subAngle[m] ?? 0) > 0) this.flushSub(m);
      const subs = this.subCount[m] ?? 0;
      const width = this.halfSlots.length * 3;
      const zoom = this.zoomFor(subs);
      const n = zoom.size;
      // How a tone exactly on an order spreads over the zoom: the spectrum of the block's window
      // as the sub-blocks sample it. Its energy within the main lobe, over its centre, makes the
      // lobe's energy read A²/2 for such a tone.
      const padding = n / Math.max(1, subs);
      // Half-width of the core, in padded bins: LOBE_CORE_BINS of the unpadded DFT (0: the centre
      // bin alone, the plain coherent sum).
      const first = 1 + Math.floor(LOBE_CORE_BINS * padding);
      const own = zoom.powers(this.subWeight[m] as Float64Array, this.zeros, subs);
      let ownLobe = own[0] ?? 0;
      for (let k = 1; k < first; k++) ownLobe += (own[k] ?? 0) + (own[n - k] ?? 0);
      const lobeScale = ownLobe > 0 ? (own[0] ?? 0) / ownLobe : 1;
      for (let o = 0; o < this.orders.length; o++) {
        const p = out.power[m]?.[o] as Float64Array;
        const side = out.side[m]?.[o] as Float64Array;
        const q = this.orders[o] ?? 1;
        const measured = f1 * q >= this.minHz && f1 * q <= this.maxHz;
        const whole = Number.isInteger(q);
        for (let a = 0; a < 3; a++) {
          p[a] = Number.NaN;
          side[a] = Number.NaN;
          if (!measured) continue;
          const spectrum = zoom.powers(
            this.subRe[m] as Float64Array,
            this.subIm[m] as Float64Array,
            subs,
            width,
            o * 3 + a,
          );
          if (whole) {
            // The order's level is the energy of the core of the main lobe around it.
            let lobe = spectrum[0] ?? 0;
            for (let k = 1; k < first; k++) lobe += (spectrum[k] ?? 0) + (spectrum[n - k] ?? 0);
            p[a] = scale * lobe * lobeScale;
            // Sidebands: the strongest tone beyond the main lobe (±2 bins) up to ±0.25 orders
            // (bin k is (k/n)/2 orders away, wrapped).
            const beyond = Math.max(1, Math.ceil(2.5 * padding));
            let best = 0;
            for (let k = beyond; k <= n - beyond; k++) best = Math.max(best, spectrum[k] ?? 0);
            side[a] = scale * best;
          } else {
            let best = 0;
            for (let k = 0; k < n; k++) best = Math.max(best, spectrum[k] ?? 0);
            p[a] = scale * best;
          }
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
    this.flags.fill(0);
    this.changed.fill(0);
    for (const a of this.sumRe) a.fill(0);
    for (const a of this.sumIm) a.fill(0);
    for (const a of this.subRe) a.fill(0);
    for (const a of this.subIm) a.fill(0);
    for (const a of this.subWeight) a.fill(0);
    this.subWeightNow.fill(0);
    this.subAngle.fill(0);
    this.subCount.fill(0);
  }
}

function nextPow2(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}
