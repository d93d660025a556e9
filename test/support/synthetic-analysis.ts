import { bandsBelow, DEFAULT_ANALYSIS, rpmBinOf, trackedOrders } from "@/lib/analysis/settings";
import {
  ANALYSIS_VERSION,
  type LogAnalysis,
  type MotorInBand,
  type RpmBinLevels,
  type ThrottleBandAxis,
  type ThrottleBandResult,
} from "@/lib/analysis/types";
import type { Axis } from "@/lib/logs/columns";
import type { SpectralPeak } from "@/lib/signal/peaks";

/**
 * Log analyses built in closed form, for testing the baseline and the comparison on their own
 * (invented numbers, no simulation): every throttle band's spectrum is a flat floor in dB with
 * Gaussian bumps (in dB) at the given frequencies, and every motor order has one level. The
 * numbers are generated test cases; they only need to be the shapes the analyser reports.
 */

/** A bump in the spectrum: `heightDb` above the floor at `freqHz`, standard deviation `widthHz`. */
export interface Bump {
  axis: Axis;
  freqHz: number;
  heightDb: number;
  widthHz?: number;
  /** Reported as a structural peak of the whole log (what a frame mode is). Default true. */
  structural?: boolean;
}

export interface SyntheticSpec {
  /** Log rate, Hz; the trusted range is 90 % of Nyquist. Default 4000. */
  sampleRateHz?: number;
  /** Flat floor of every band spectrum, dB re 1 (deg/s)²/Hz. Default −30. */
  floorDb?: number;
  bumps?: Bump[];
  /** Added to every band spectrum from this frequency up (a broadband rise). */
  riseAbove?: { freqHz: number; db: number };
  /** Added to one analysis band's level on one axis (by the band's low edge), dB. */
  bandOffset?: { axis: Axis; loHz: number; db: number };
  /** Throttle bands flown (indices of 8 over 0..1) and their segment counts. Default 2, 3, 4 with 20 each. */
  flown?: Record<number, number>;
  /** Order level of a motor, dB re 1 (deg/s)², every axis. Default −10 (sidebands 10 dB below). */
  orderDb?: (motor: number, order: number) => number;
  /** Level beside each order, dB, every axis. Default 10 dB below the order. */
  sideDb?: (motor: number, order: number) => number;
  /**
   * Half orders as analyses stored before they were measured exactly: the level is the strongest
   * tone near the order (`sideDb`'s value), and nothing is beside it.
   */
  oldHalfOrders?: boolean;
  /** Share of the log's order blocks whose telemetry was masked, per motor. */
  maskedShare?: Record<number, number>;
  /** Axes without a usable signal, and the sentence for it. */
  unusable?: Partial<Record<Axis, string>>;
  /**
   * Gives every motor an rpm map (orders by its own rotation rate): the rotation rates it flew,
   * Hz, each one bin of 10 blocks, and the order level there, dB, every axis (sidebands 10 dB
   * below). Without it the analysis has none, as analyses stored before rpm maps.
   */
  rpmMap?: {
    flownHz: (motor: number) => number[];
    orderDb: (motor: number, order: number, rotationHz: number) => number;
  };
}

export const BIN_HZ = 2;
export const MOTORS = [1, 2, 3, 4];
const BLOCKS_PER_BAND = 40;
const THROTTLE_BANDS = DEFAULT_ANALYSIS.throttleBands;

/** Rotation rate of a motor in a throttle band, Hz: rising with throttle, motors 1.5 % apart. */
export function rotationHz(bandIndex: number, motor: number): number {
  return (120 + 40 * (bandIndex - 2)) * (1 + 0.015 * (motor - 1));
}

function perAxis<T>(f: (axis: Axis) => T): Record<Axis, T> {
  return { roll: f("roll"), pitch: f("pitch"), yaw: f("yaw") };
}

/** The peak the analyser would report for a bump (full width at half maximum 2.355 σ). */
function peakOf(b: Bump, floorDb: number): SpectralPeak {
  return {
    freqHz: b.freqHz,
    levelDb: floorDb + b.heightDb,
    prominenceDb: b.heightDb,
    widthHz: 2.355 * (b.widthHz ?? 4),
    bin: Math.round(b.freqHz / BIN_HZ),
  };
}

function bandAxis(
  spec: SyntheticSpec,
  axis: Axis,
  bins: number,
  bands: LogAnalysis["bands"],
): ThrottleBandAxis {
  const floor = spec.floorDb ?? -30;
  const psdDb = Array.from({ length: bins }, (_, k) => {
    const f = k * BIN_HZ;
    let db = floor;
    for (const b of spec.bumps ?? []) {
      if (b.axis !== axis) continue;
      const w = b.widthHz ?? 4;
      db += b.heightDb * Math.exp(-(((f - b.freqHz) / w) ** 2) / 2);
    }
    if (spec.riseAbove && f >= spec.riseAbove.freqHz) db += spec.riseAbove.db;
    return Math.round(db * 100) / 100;
  });
  const bandDb = bands.map((band) => {
    let power = 0;
    for (let k = Math.ceil(band.loHz / BIN_HZ); k * BIN_HZ < band.hiHz && k < bins; k++)
      power += 10 ** ((psdDb[k] ?? floor) / 10) * BIN_HZ;
    const offset =
      spec.bandOffset?.axis === axis && spec.bandOffset.loHz === band.loHz ? spec.bandOffset.db : 0;
    return 10 * Math.log10(power) + offset;
  });
  const peaks = (spec.bumps ?? []).filter((b) => b.axis === axis).map((b) => peakOf(b, floor));
  return { psdDb, bandDb, bandSpreadDb: bands.map(() => 1), floorDb: floor, peaks };
}

function motorsIn(spec: SyntheticSpec, index: number, bladeCount: number): MotorInBand[] {
  return MOTORS.map((motor) => {
    const rot = rotationHz(index, motor);
    return {
      motor,
      meanRpm: rot * 60,
      blocks: BLOCKS_PER_BAND,
      maskedBlocks: Math.round(BLOCKS_PER_BAND * (spec.maskedShare?.[motor] ?? 0)),
      orders: trackedOrders(bladeCount).map((order) => {
        const db = spec.orderDb?.(motor, order) ?? -10;
        const sDb = spec.sideDb?.(motor, order) ?? db - 10;
        const all = (v: number) => ({ roll: v, pitch: v, yaw: v });
        const common = {
          order,
          label: order === bladeCount ? "blade-pass" : `${order}x`,
          freqHz: order * rot,
        };
        return spec.oldHalfOrders && !Number.isInteger(order)
          ? { ...common, powerDb: all(sDb) }
          : { ...common, powerDb: all(db), sideDb: all(sDb) };
      }),
    };
  });
}

/** A whole log's analysis made from `spec` (see {@link SyntheticSpec} for the defaults). */
export function syntheticAnalysis(spec: SyntheticSpec = {}): LogAnalysis {
  const sampleRateHz = spec.sampleRateHz ?? 4000;
  const maxFreqHz = 0.45 * sampleRateHz;
  const nperseg = sampleRateHz / BIN_HZ;
  const bins = Math.floor(sampleRateHz / 2 / BIN_HZ) + 1;
  const bands = bandsBelow(DEFAULT_ANALYSIS.bandEdgesHz, maxFreqHz);
  const bladeCount = DEFAULT_ANALYSIS.bladeCount;
  const flown = spec.flown ?? { 2: 20, 3: 20, 4: 20 };
  const throttleBands: ThrottleBandResult[] = Array.from({ length: THROTTLE_BANDS }, (_, i) => {
    const lo = i / THROTTLE_BANDS;
    const hi = (i + 1) / THROTTLE_BANDS;
    const segments = flown[i] ?? 0;
    const axes = perAxis((axis) => bandAxis(spec, axis, bins, bands));
    return {
      index: i,
      lo,
      hi,
      seconds: (segments * nperseg) / 2 / sampleRateHz,
      segments,
      meanThrottle: (lo + hi) / 2,
      axes,
      motors: segments > 0 ? motorsIn(spec, i, bladeCount) : [],
    };
  });
  const segments = throttleBands.reduce((s, b) => s + b.segments, 0);
  const axes = perAxis((axis) => {
    const problem = spec.unusable?.[axis];
    return {
      signal: {
        usable: !problem,
        ...(problem ? { problem: "flat" as const, text: problem } : {}),
        clippedShare: 0,
        minDegS: -100,
        maxDegS: 100,
      },
      psd: [],
      peaks: (spec.bumps ?? [])
        .filter((b) => b.axis === axis && (b.structural ?? true))
        .map((b) => ({
          ...peakOf(b, spec.floorDb ?? -30),
          kind: "structural" as const,
          seenInBands: Object.keys(flown).map(Number),
        })),
      bandPower: [],
      floorDb: spec.floorDb ?? -30,
      rmsDegS: 5,
    };
  });
  return {
    version: ANALYSIS_VERSION,
    sampleRateHz,
    durationS: (segments * nperseg) / 2 / sampleRateHz,
    samples: (segments * nperseg) / 2,
    gaps: [],
    droppedRows: 0,
    metadata: {},
    guesses: [],
    settings: {
      nperseg,
      noverlap: nperseg / 2,
      window: "hann",
      average: "mean",
      binHz: BIN_HZ,
      bladeCount,
      minFreqHz: DEFAULT_ANALYSIS.minFreqHz,
      maxFreqHz,
      floorCornerHz: DEFAULT_ANALYSIS.floorCornerHz,
    },
    segments,
    freqHz: Array.from({ length: bins }, (_, k) => k * BIN_HZ),
    bands,
    axes,
    hasThrottle: true,
    throttleBands,
    motors: MOTORS.map((motor) => {
      const share = spec.maskedShare?.[motor] ?? 0;
      return {
        motor,
        meanRpm: rotationHz(3, motor) * 60,
        maskedShare: share,
        maskedBlocks: {
          zero: Math.round(BLOCKS_PER_BAND * 3 * share),
          range: 0,
          stuck: 0,
          slew: 0,
        },
        track: [],
        ...(spec.rpmMap ? { rpmMap: rpmMapOf(spec.rpmMap, motor, bladeCount) } : {}),
      };
    }),
  };
}

function rpmMapOf(
  map: NonNullable<SyntheticSpec["rpmMap"]>,
  motor: number,
  bladeCount: number,
): RpmBinLevels[] {
  const byBin = new Map<number, number>();
  for (const hz of map.flownHz(motor)) byBin.set(rpmBinOf(hz), hz);
  return [...byBin.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([bin, hz]) => ({
      bin,
      rotationHz: hz,
      blocks: 10,
      orders: trackedOrders(bladeCount).map((order) => {
        const db = map.orderDb(motor, order, hz);
        return {
          order,
          powerDb: { roll: db, pitch: db, yaw: db },
          sideDb: { roll: db - 10, pitch: db - 10, yaw: db - 10 },
        };
      }),
    }));
}
