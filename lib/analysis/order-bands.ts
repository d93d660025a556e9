import { axisRecord, type PerAxis } from "../logs/columns";
import type { SampleBlock } from "../logs/read-log";
import { toDb } from "../signal/bands";
import { Biquad } from "../signal/biquad";
import { RunningMedian } from "../signal/running-median";
import { round } from "../signal/stats";
import { MASK_REASONS, OrderTracker, type MaskReason, type OrderBlock } from "./order-tracker";
import { throttleBandOf, type AnalysisPlan } from "./plan";
import { RPM_MAP, rpmBinOf, TELEMETRY_LIMITS } from "./settings";
import type { MotorInBand, MotorSummary, MotorTrackPoint, OrderLevel } from "./types";

/** Corner of the order tracking's high-pass, as a fraction of the lowest analysed frequency. */
const HIGH_PASS_FRACTION = 0.25;

const axisArrays = (n: number): PerAxis<Float64Array> => [
  new Float64Array(n),
  new Float64Array(n),
  new Float64Array(n),
];

/** Points of a motor's track in the results; longer tracks are averaged down to this. */
const MAX_TRACK_POINTS = 300;

/**
 * One motor's order in one throttle band (or rpm bin), over the blocks that measured it. Its level
 * is the median of the blocks' powers, not the mean: the flight controller's rpm notches lag a
 * motor that changes speed fast (flips, punch-outs), and in those few blocks an order leaks
 * through tens of dB stronger; a mean is ruled by them, so the same healthy motor read 20–30 dB
 * higher in a freestyle flight than in a gentle one at the same rpm. The median follows the
 * steady blocks, which are most of any flight.
 */
interface OrderSums {
  /** Blocks that measured it (telemetry believed, frequency below the trusted top). */
  count: number;
  /**
   * The running median of the measured blocks' power, and of the power beside the order, per
   * axis, in dB (a median is the same in dB as in power; the P² markers interpolate better on
   * the log scale of a skewed power).
   */
  power: PerAxis<RunningMedian>;
  side: PerAxis<RunningMedian>;
}

const medians = (): PerAxis<RunningMedian> => [
  new RunningMedian(),
  new RunningMedian(),
  new RunningMedian(),
];

/** One motor's order-tracking sums in one throttle band. */
interface MotorSums {
  /** Blocks measured and blocks masked; Σ mean rpm of the measured ones. */
  measured: number;
  masked: number;
  rpmSum: number;
  orders: OrderSums[];
}

/** The order-tracking blocks whose mean throttle fell in one throttle band. */
interface BandSums {
  blocks: number;
  motors: MotorSums[];
}

/** One motor's measured blocks in one bin of its own rotation rate. */
interface RpmBinSums {
  blocks: number;
  rotationSum: number;
  orders: OrderSums[];
}

/** One motor through the whole log: its 1× track, its masked blocks by reason, its rpm bins. */
interface MotorRecord {
  track: MotorTrackPoint[];
  masked: Record<MaskReason, number>;
  rpmBins: Map<number, RpmBinSums>;
}

const emptyOrderSums = (): OrderSums => ({ count: 0, power: medians(), side: medians() });

/**
 * The motor orders of a log with rpm telemetry: the {@link OrderTracker}'s blocks summed per
 * throttle band and motor (a level is the median power of the blocks that measured it), and each
 * motor's 1× track and masked blocks through the log. Untrustworthy telemetry is counted, never
 * measured.
 */
export class OrderBands {
  private readonly plan: AnalysisPlan;
  private readonly tracker: OrderTracker;
  private readonly sums: BandSums[];
  private readonly records: MotorRecord[];
  /** Index of the 1× order among the tracked ones (its level is the track's). */
  private readonly one: number;
  private blocksSeen = 0;
  /**
   * The gyro the tracker demodulates, high-passed. ESC telemetry is held and stepped, so the
   * angle integrated from it bends at every step, and a manoeuvre (hundreds of deg/s at a few
   * hertz, 50–60 dB above a notched order) demodulated by that bent angle no longer cancels: it
   * read 13 dB above a real 1 deg/s tone beside the orders (test/unit/order-bands.test.ts), and
   * on the simulator's flights it raised the notched 1× by some 25 dB and every tone beside an
   * order by 30–40 dB, where bent props and worn bearings are to be seen. Two Butterworth
   * sections at HIGH_PASS_FRACTION of the lowest analysed frequency (10 Hz) change an order at
   * 40 Hz or above by under 0.04 dB and take 25 dB off at 5 Hz, 55 dB at 2 Hz.
   */
  private readonly highPass: PerAxis<[Biquad, Biquad]>;
  private filtered: PerAxis<Float64Array> = axisArrays(0);
  /** Whether the high-pass runs on from the previous block (false after a gap). */
  private settled = false;

  constructor(plan: AnalysisPlan) {
    this.plan = plan;
    const motors = plan.motors.length;
    this.sums = Array.from({ length: plan.throttleBands }, () => ({
      blocks: 0,
      motors: Array.from({ length: motors }, () => ({
        measured: 0,
        masked: 0,
        rpmSum: 0,
        orders: plan.orders.map(emptyOrderSums),
      })),
    }));
    this.records = Array.from({ length: motors }, () => ({
      track: [],
      masked: { zero: 0, range: 0, stuck: 0, slew: 0 },
      rpmBins: new Map(),
    }));
    this.one = plan.orders.findIndex((o) => o.order === 1);
    const corner = HIGH_PASS_FRACTION * plan.settings.minFreqHz;
    const section = () => Biquad.highPass(corner, Math.SQRT1_2, plan.sampleRateHz);
    this.highPass = [
      [section(), section()],
      [section(), section()],
      [section(), section()],
    ];
    this.tracker = new OrderTracker(
      plan.sampleRateHz,
      motors,
      plan.orders.map((o) => o.order),
      plan.settings.minFreqHz,
      plan.maxFreqHz,
      TELEMETRY_LIMITS,
      (b) => this.add(b),
    );
  }

  /** No order block may straddle a gap. */
  gap(): void {
    this.tracker.reset();
    this.settled = false;
  }

  push(block: SampleBlock): void {
    const n = block.length;
    if (this.filtered[0].length < n) this.filtered = axisArrays(n);
    for (const a of [0, 1, 2] as const) {
      const x = block.gyro[a];
      const y = this.filtered[a];
      const [first, second] = this.highPass[a];
      if (this.settled === false && n > 0) {
        first.settle(x[0] ?? 0);
        second.settle(0);
      }
      for (let i = 0; i < n; i++) y[i] = second.step(first.step(x[i] ?? 0));
    }
    if (n > 0) this.settled = true;
    this.tracker.push(n, block.timeS, this.filtered, block.throttle, block.rpm);
  }

  private add(b: OrderBlock): void {
    const band = this.sums[throttleBandOf(b.throttle, this.plan.throttleBands)];
    if (!band) return;
    band.blocks++;
    this.blocksSeen++;
    band.motors.forEach((sums, m) => {
      const record = this.records[m];
      if (!record) return;
      const reason = b.masked[m];
      if (reason) {
        sums.masked++;
        record.masked[reason]++;
        return;
      }
      const rotationHz = b.rotationHz[m] ?? 0;
      sums.measured++;
      sums.rpmSum += rotationHz * 60;
      // A block enters the motor's rpm map only when its rpm held within RPM_MAP.steadySpread
      // (10 %) over the block: the steady flying that can be matched to the baseline's at the
      // same speed. In fast changes
      // (flips, punch-outs) the flight controller's notches lag and the telemetry trails, and
      // the levels of those few blocks scatter by tens of dB.
      const steady = (b.rotationSpread[m] ?? Infinity) <= RPM_MAP.steadySpread;
      const key = rpmBinOf(rotationHz);
      let bin = steady ? record.rpmBins.get(key) : undefined;
      if (steady && !bin) {
        bin = { blocks: 0, rotationSum: 0, orders: this.plan.orders.map(emptyOrderSums) };
        record.rpmBins.set(key, bin);
      }
      if (bin) {
        bin.blocks++;
        bin.rotationSum += rotationHz;
      }
      let order1Max = Number.NaN;
      sums.orders.forEach((order, j) => {
        const power = b.power[m]?.[j];
        const side = b.side[m]?.[j];
        if (!power || !side || !Number.isFinite(power[0])) return;
        addBlock(power, side, order, bin?.orders[j]);
        if (j === this.one) order1Max = Math.max(power[0] ?? 0, power[1] ?? 0, power[2] ?? 0);
      });
      record.track.push({
        tS: b.tS,
        rotationHz,
        order1Db: Number.isNaN(order1Max) ? Number.NaN : toDb(order1Max),
      });
    });
  }

  /** Each motor's mean rpm and order levels in throttle band `index`, dB re 1 (deg/s)². */
  bandMotors(index: number): MotorInBand[] {
    const band = this.sums[index];
    if (!band) return [];
    return band.motors.map((sums, m) => {
      const meanRpm = sums.measured > 0 ? sums.rpmSum / sums.measured : 0;
      return {
        motor: this.plan.motors[m] ?? 0,
        meanRpm: round(meanRpm, 1),
        blocks: band.blocks,
        maskedBlocks: sums.masked,
        orders: this.plan.orders.map((o, j) => {
          const level: OrderLevel = {
            label: o.label,
            freqHz: round((meanRpm / 60) * o.order, 2),
            ...orderLevels(o.order, sums.orders[j] ?? emptyOrderSums()),
          };
          return level;
        }),
      };
    });
  }

  /** Each motor through the whole log: mean rpm, masked share and blocks, its 1× track. */
  summaries(): MotorSummary[] {
    return this.records.map((record, m) => {
      const track = record.track;
      const meanRpm =
        track.length > 0 ? (track.reduce((s, p) => s + p.rotationHz, 0) / track.length) * 60 : 0;
      const maskedBlocks = MASK_REASONS.reduce((s, r) => s + record.masked[r], 0);
      return {
        motor: this.plan.motors[m] ?? 0,
        meanRpm: round(meanRpm, 1),
        maskedShare: this.blocksSeen > 0 ? round(maskedBlocks / this.blocksSeen, 4) : 0,
        maskedBlocks: record.masked,
        track: decimateTrack(track, MAX_TRACK_POINTS),
        rpmMap: [...record.rpmBins.entries()]
          .sort((x, y) => x[0] - y[0])
          .map(([bin, sums]) => ({
            bin,
            rotationHz: round(sums.rotationSum / sums.blocks, 2),
            blocks: sums.blocks,
            orders: this.plan.orders.map((o, j) =>
              orderLevels(o.order, sums.orders[j] ?? emptyOrderSums()),
            ),
          })),
      };
    });
  }
}

/** One block's order levels into its throttle band's sums and, when steady, its rpm bin's. */
function addBlock(
  power: Float64Array,
  side: Float64Array,
  ...into: (OrderSums | undefined)[]
): void {
  for (const a of [0, 1, 2] as const) {
    const p = toDb(power[a] ?? 0);
    const s = side[a] ?? 0;
    const sDb = toDb(Number.isFinite(s) ? s : 0);
    for (const sums of into) {
      sums?.power[a].push(p);
      sums?.side[a].push(sDb);
    }
  }
  for (const sums of into) if (sums) sums.count++;
}

/** An order's level and the level beside it, the medians over the blocks that measured it, dB. */
function orderLevels(
  order: number,
  sums: OrderSums,
): Pick<OrderLevel, "order" | "powerDb" | "sideDb"> {
  const levelDb = (blocks: PerAxis<RunningMedian>) =>
    axisRecord((_axis, a) => (sums.count > 0 ? round(blocks[a].value(), 3) : Number.NaN));
  return { order, powerDb: levelDb(sums.power), sideDb: levelDb(sums.side) };
}

/** At most `maxPoints` points: consecutive groups averaged (order levels as powers), rounded. */
function decimateTrack(track: MotorTrackPoint[], maxPoints: number): MotorTrackPoint[] {
  if (track.length <= maxPoints) return track.map(roundPoint);
  const group = Math.ceil(track.length / maxPoints);
  const out: MotorTrackPoint[] = [];
  for (let i = 0; i < track.length; i += group) {
    const part = track.slice(i, i + group);
    const n = part.length;
    out.push(
      roundPoint({
        tS: part.reduce((s, p) => s + p.tS, 0) / n,
        rotationHz: part.reduce((s, p) => s + p.rotationHz, 0) / n,
        order1Db: meanDb(part.map((p) => p.order1Db)),
      }),
    );
  }
  return out;
}

/** Power mean of dB values, skipping NaN (segments where the order was not clear). */
function meanDb(values: number[]): number {
  const v = values.filter(Number.isFinite);
  return v.length === 0 ? Number.NaN : toDb(v.reduce((s, x) => s + 10 ** (x / 10), 0) / v.length);
}

function roundPoint(p: MotorTrackPoint): MotorTrackPoint {
  return { tS: round(p.tS, 3), rotationHz: round(p.rotationHz, 2), order1Db: round(p.order1Db, 2) };
}
