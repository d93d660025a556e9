import type { PerAxis } from "../logs/columns";
import { ComplexPowerSpectrum } from "../signal/fft";
import { foldedHz } from "../signal/folding";
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
  /** How far each motor's logged rpm ranged over the block: (max − min) / mean (NaN when masked). */
  rotationSpread: Float64Array;
  /** Why each motor's block is masked, or null when it was measured. */
  masked: (MaskReason | null)[];
  /**
   * power[m][o][axis] in (deg/s)²; NaN when the motor is masked or the order's frequency lies
   * outside the trusted range. Owned by the tracker; valid during the callback.
   */
  power: Float64Array[][];
  /** Whole orders: the strongest tone beside it (outside its main lobe, up to 0.25 orders away); half orders: the strongest tone within ±0.25 orders, (deg/s)². */
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

/**
 * A folded order is measured only this many Hann main-lobe half-widths (2/T each) away from every
 * other order of its motor where that one shows: nearer, the two tones' lobes overlap and neither
 * level is its own.
 */
const FOLD_CLEARANCE_MAIN_LOBES = 2;

/** The highest order followed where it folds (see OrderTracker.measurable). */
const MAX_FOLDED_ORDER = 2;

/** Bits of a motor's telemetry flags in a block; stuck is judged at the block's end, across motors. */
const FLAG = { zero: 1, range: 2, slew: 4 } as const;

/** One motor's running sums and telemetry checks in the current block. */
interface MotorState {
  /** Half-angle rotor phasor e^{iφ/2}, advanced by each sample's rpm. */
  re: number;
  im: number;
  /** Σ x·w·cos and Σ x·w·sin of the current sub-block, [slot·3 + axis]. */
  readonly sumRe: Float64Array;
  readonly sumIm: Float64Array;
  rpmSum: number;
  /** Lowest and highest logged rpm in this block. */
  rpmMin: number;
  rpmMax: number;
  /** FLAG bits seen in this block, and whether the value changed in it. */
  flags: number;
  changed: boolean;
  /** The last rpm value and the sample index at which it last changed. */
  lastRpm: number;
  lastChange: number;
  /** Angle since the current sub-block began (rad), and sub-blocks stored so far. */
  subAngle: number;
  subCount: number;
  /** Stored sub-block sums [sub · orders·3 + slot·3 + axis]. */
  readonly subRe: Float64Array;
  readonly subIm: Float64Array;
  /** Σ window of the current sub-block, and of each stored one. */
  subWeightNow: number;
  readonly subWeight: Float64Array;
}

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
  private throttleSum = 0;
  private readonly states: MotorState[];
  private readonly result: OrderBlock;
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
    // At the top believable rotation a block holds this many two-revolution sub-blocks.
    this.maxSubs = Math.ceil((this.blockLength * this.dt * limits.maxRpm) / 60 / 2) + 2;
    const width = orders.length * 3;
    this.states = Array.from({ length: motors }, () => ({
      re: 1,
      im: 0,
      sumRe: new Float64Array(width),
      sumIm: new Float64Array(width),
      rpmSum: 0,
      rpmMin: Infinity,
      rpmMax: -Infinity,
      flags: 0,
      changed: false,
      lastRpm: Number.NaN,
      lastChange: 0,
      subAngle: 0,
      subCount: 0,
      subRe: new Float64Array(this.maxSubs * width),
      subIm: new Float64Array(this.maxSubs * width),
      subWeightNow: 0,
      subWeight: new Float64Array(this.maxSubs),
    }));
    this.zeros = new Float64Array(this.maxSubs);
    this.result = {
      throttle: 0,
      rotationHz: new Float64Array(motors),
      rotationSpread: new Float64Array(motors),
      masked: Array.from({ length: motors }, () => null),
      power: Array.from({ length: motors }, () => orders.map(() => new Float64Array(3))),
      side: Array.from({ length: motors }, () => orders.map(() => new Float64Array(3))),
      tS: 0,
    };
  }

  /** Starts a new block; called at gaps so that no block spans one. */
  reset(): void {
    this.fill = 0;
    for (const st of this.states) st.lastRpm = Number.NaN;
    this.clear();
  }

  /** Feeds samples [0, n) of a block of the log; `rpm` holds one array per motor. */
  push(
    n: number,
    timeS: Float64Array,
    gyro: PerAxis<Float64Array>,
    throttle: Float64Array | null,
    rpm: readonly Float64Array[],
  ): void {
    if (rpm.length !== this.motors) {
      throw new RangeError(`the order tracker follows ${this.motors} motors, got ${rpm.length}`);
    }
    let i = 0;
    while (i < n) {
      if (this.fill === 0) this.startS = timeS[i] ?? 0;
      const run = Math.min(n - i, this.blockLength - this.fill);
      if (throttle) for (let j = i; j < i + run; j++) this.throttleSum += throttle[j] ?? 0;
      const from = i;
      rpm.forEach((r, m) => {
        const st = this.states[m];
        if (st) this.accumulate(st, from, run, gyro, r);
      });
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
    st: MotorState,
    from: number,
    run: number,
    gyro: PerAxis<Float64Array>,
    rpm: Float64Array,
  ): void {
    const w = this.window;
    const [g0, g1, g2] = gyro;
    const sr = st.sumRe;
    const si = st.sumIm;
    const slots = this.slotOfHalf;
    const halves = this.halves;
    const radPerRpmSampleHalf = (Math.PI * this.dt) / 60;
    const { minRpm, maxRpm, maxSlewRpmPerS } = this.limits;
    const maxStep = maxSlewRpmPerS * this.dt;
    let hc = st.re;
    let hs = st.im;
    let rpmSum = 0;
    let rpmMin = st.rpmMin;
    let rpmMax = st.rpmMax;
    let flags = st.flags;
    let changed = st.changed;
    let last = st.lastRpm;
    let lastChange = st.lastChange;
    let f = this.fill;
    let index = this.sampleIndex;
    let angle = st.subAngle;
    let weight = st.subWeightNow;
    for (let j = from; j < from + run; j++, f++, index++) {
      const wi = w[f] ?? 0;
      weight += wi;
      const x0 = (g0[j] ?? 0) * wi;
      const x1 = (g1[j] ?? 0) * wi;
      const x2 = (g2[j] ?? 0) * wi;
      // e^{ihφ/2} for h = 1..H by complex multiplication of the half-angle phasor.
      let c = hc;
      let s = hs;
      for (let h = 1; h <= halves; h++) {
        if (h > 1) {
          const cn = c * hc - s * hs;
          s = s * hc + c * hs;
          c = cn;
        }
        const slot = slots[h] ?? -1;
        if (slot < 0) continue;
        const b = slot * 3;
        sr[b] = (sr[b] ?? 0) + x0 * c;
        sr[b + 1] = (sr[b + 1] ?? 0) + x1 * c;
        sr[b + 2] = (sr[b + 2] ?? 0) + x2 * c;
        si[b] = (si[b] ?? 0) + x0 * s;
        si[b + 1] = (si[b + 1] ?? 0) + x1 * s;
        si[b + 2] = (si[b + 2] ?? 0) + x2 * s;
      }
      const r = rpm[j] ?? 0;
      rpmSum += r;
      if (r < rpmMin) rpmMin = r;
      if (r > rpmMax) rpmMax = r;
      if (!(r > 0)) flags |= FLAG.zero;
      else if (r < minRpm || r > maxRpm) flags |= FLAG.range;
      if (r !== last) {
        // Telemetry is held between updates: the rate of change is judged over the time since
        // the value last changed, not over one sample.
        if (last === last && Math.abs(r - last) > maxStep * (index - lastChange))
          flags |= FLAG.slew;
        last = r;
        lastChange = index;
        changed = true;
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
      if (angle >= 4 * Math.PI) {
        angle -= 4 * Math.PI;
        st.subWeightNow = weight;
        this.flushSub(st);
        weight = 0;
      }
    }
    st.subAngle = angle;
    st.subWeightNow = weight;
    st.re = hc;
    st.im = hs;
    st.rpmSum += rpmSum;
    st.rpmMin = rpmMin;
    st.rpmMax = rpmMax;
    st.flags = flags;
    st.changed = changed;
    st.lastRpm = last;
    st.lastChange = lastChange;
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

  /** Moves a motor's running sums into its next two-revolution sub-block. */
  private flushSub(st: MotorState): void {
    const j = st.subCount;
    const sr = st.sumRe;
    const si = st.sumIm;
    const width = sr.length;
    // More sub-blocks than a believable rpm allows: the motor is masked anyway (range); keep
    // summing into the last one.
    const into = Math.min(j, this.maxSubs - 1);
    st.subWeight[into] = (st.subWeight[into] ?? 0) + st.subWeightNow;
    st.subWeightNow = 0;
    const dr = st.subRe;
    const di = st.subIm;
    for (let b = 0; b < width; b++) {
      const t = into * width + b;
      dr[t] = (dr[t] ?? 0) + (sr[b] ?? 0);
      di[t] = (di[t] ?? 0) + (si[b] ?? 0);
    }
    sr.fill(0);
    si.fill(0);
    st.subCount = Math.min(j + 1, this.maxSubs);
  }

  private emit(): void {
    const len = this.blockLength;
    const out = this.result;
    out.tS = this.startS;
    out.throttle = this.throttleSum / len;
    const scale = 2 / (this.windowSum * this.windowSum);
    // A value that never changes over a whole block while another motor's does is stuck
    // telemetry (a motor in flight never holds its speed to the last rpm for a quarter second).
    const anyChanged = this.states.some((st) => st.changed);
    this.states.forEach((st, m) => {
      const flags = st.flags;
      const reason: MaskReason | null =
        flags & FLAG.zero
          ? "zero"
          : flags & FLAG.range
            ? "range"
            : flags & FLAG.slew
              ? "slew"
              : anyChanged && !st.changed
                ? "stuck"
                : null;
      out.masked[m] = reason;
      const f1 = reason ? Number.NaN : st.rpmSum / len / 60;
      out.rotationHz[m] = f1;
      out.rotationSpread[m] = reason ? Number.NaN : (st.rpmMax - st.rpmMin) / (f1 * 60);
      // Keep the phasor on the unit circle despite rounding.
      const mag = Math.hypot(st.re, st.im) || 1;
      st.re /= mag;
      st.im /= mag;
      if (st.subAngle > 0) this.flushSub(st);
      const subs = st.subCount;
      const width = st.sumRe.length;
      const zoom = this.zoomFor(subs);
      const n = zoom.size;
      // How a tone exactly on an order spreads over the zoom: the spectrum of the block's window
      // as the sub-blocks sample it. Its energy within the main lobe, over its centre, makes the
      // lobe's energy read A²/2 for such a tone.
      const padding = n / Math.max(1, subs);
      // Half-width of the core, in padded bins: LOBE_CORE_BINS of the unpadded DFT (0: the centre
      // bin alone, the plain coherent sum).
      const first = 1 + Math.floor(LOBE_CORE_BINS * padding);
      const own = zoom.powers(st.subWeight, this.zeros, subs);
      let ownLobe = own[0] ?? 0;
      for (let k = 1; k < first; k++) ownLobe += (own[k] ?? 0) + (own[n - k] ?? 0);
      const lobeScale = ownLobe > 0 ? (own[0] ?? 0) / ownLobe : 1;
      const powers = out.power[m] ?? [];
      const sides = out.side[m] ?? [];
      this.orders.forEach((q, o) => {
        const p = powers[o];
        const side = sides[o];
        if (!p || !side) return;
        const whole = Number.isInteger(q);
        const measured = this.measurable(f1, o);
        for (let a = 0; a < 3; a++) {
          p[a] = Number.NaN;
          side[a] = Number.NaN;
          if (!measured) continue;
          const spectrum = zoom.powers(st.subRe, st.subIm, subs, width, o * 3 + a);
          // The order's level is the energy of the core of the main lobe around it, for half
          // orders too: a loose part's sub-harmonics sit exactly at half orders, locked to the
          // motor's angle like its whole orders.
          let lobe = spectrum[0] ?? 0;
          for (let k = 1; k < first; k++) lobe += (spectrum[k] ?? 0) + (spectrum[n - k] ?? 0);
          p[a] = scale * lobe * lobeScale;
          // Beside it (bin k is (k/n)/2 orders away, wrapped): for a whole order, the strongest
          // tone beyond the main lobe (±2 bins) up to ±0.25 orders, its sidebands; for a half
          // order, the strongest tone anywhere within ±0.25 orders, the order spectrum between
          // the whole orders (a bearing's tones fall at non-integer orders no fixed order hits).
          const beyond = whole ? Math.max(1, Math.ceil(2.5 * padding)) : 0;
          let best = 0;
          for (let k = beyond; k <= n - beyond; k++) best = Math.max(best, spectrum[k] ?? 0);
          side[a] = scale * best;
        }
      });
    });
    this.onBlock(out);
    this.fill = 0;
    this.clear();
  }

  /**
   * Whether order `o` of a motor turning at `rotationHz` is measured in this block: where its
   * frequency lies in [minHz, maxHz]; or, for a whole order above the log's Nyquist frequency,
   * where it folds (lib/signal/folding.ts) into that range clear of every other tracked order of
   * the motor. Demodulating the samples at q times the motor's angle is coherent with the folded
   * tone as with a direct one (the samples are the same numbers), so it reads its true level: in
   * a 1 kHz log a bent prop's 2× (600–900 Hz) is still seen, where the flight controller's rpm
   * notches took most of its 1×. Only 1× and 2× are followed there, the orders a mechanical
   * fault raises (unbalance, a bent shaft or prop, looseness; common practice in machine
   * vibration diagnosis). The blade pass and 4× have passed the low-passes tens of dB down and,
   * folded, read mostly what lies where they land (a 1 kHz log's blade pass folds into the prop
   * wash near 50 Hz); the order spectrum between the whole orders would read the frame's modes.
   */
  private measurable(rotationHz: number, o: number): boolean {
    const q = this.orders[o] ?? 0;
    const f = rotationHz * q;
    if (f >= this.minHz && f <= this.maxHz) return true;
    const fs = 1 / this.dt;
    if (!Number.isInteger(q) || q > MAX_FOLDED_ORDER || f <= fs / 2) return false;
    const at = foldedHz(f, fs);
    if (at < this.minHz || at > this.maxHz) return false;
    const clearance = FOLD_CLEARANCE_MAIN_LOBES * (2 / (this.blockLength * this.dt));
    return this.orders.every(
      (other, j) => j === o || Math.abs(foldedHz(rotationHz * other, fs) - at) >= clearance,
    );
  }

  private clear(): void {
    this.throttleSum = 0;
    for (const st of this.states) {
      st.rpmSum = 0;
      st.rpmMin = Infinity;
      st.rpmMax = -Infinity;
      st.flags = 0;
      st.changed = false;
      st.sumRe.fill(0);
      st.sumIm.fill(0);
      st.subRe.fill(0);
      st.subIm.fill(0);
      st.subWeight.fill(0);
      st.subWeightNow = 0;
      st.subAngle = 0;
      st.subCount = 0;
    }
  }
}

function nextPow2(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}
