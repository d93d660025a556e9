import { DEFAULT_ANALYSIS } from "../analysis/settings";
import { orderGeneration, type LogAnalysis, type RpmBinLevels } from "../analysis/types";
import { InputError } from "../errors";
import { AXES, type Axis } from "../logs/columns";
import type { FrequencyBand } from "../signal/bands";
import { peaksAboveLocalMedian } from "../signal/peaks";
import { mean, median, round, stdDev } from "../signal/stats";
import { DEFAULT_THRESHOLDS } from "./thresholds";

/**
 * An airframe's known-good reference, built from one or more logs flown when it was healthy.
 * Everything is kept per axis and per throttle band, so a later log is compared like with like.
 */

export interface BaselineAxisBand {
  /** Band power, dB re 1 (deg/s)², mean over logs. */
  bandDb: number[];
  /** Scatter of one segment's band level, dB (pooled over the logs). */
  segmentSpreadDb: number[];
  /** Scatter of the per-log mean band level across logs, dB (0 for a single log). */
  logSpreadDb: number[];
  floorDb: number;
  floorLogSpreadDb: number;
  /** Mean PSD in dB on a grid of binHz, for levels at any frequency. */
  psdDb: number[];
  /** Per bin of psdDb: scatter of the per-log band spectra across logs, dB (version 2; 0 for one log). */
  psdLogSpreadDb?: number[];
}

export interface BaselineOrder {
  order: number;
  /** Power per axis, dB re 1 (deg/s)², power mean over the logs' band levels (each a median of blocks). */
  db: Record<Axis, number>;
  /** Scatter of the per-log level across logs, dB, the largest over the axes (0 for one log). */
  logSpreadDb: number;
  /** Measured blocks behind the level, summed over the logs. */
  blocks: number;
  /** Whole orders: their sidebands' level per axis, dB. */
  sideDb?: Record<Axis, number>;
}

export interface BaselineMotorBand {
  motor: number;
  meanRpm: number;
  /** 1× order power per axis, dB. */
  order1Db: Record<Axis, number>;
  logSpreadDb: number;
  /** Every tracked order (version 2). */
  orders?: BaselineOrder[];
}

export interface BaselineThrottleBand {
  index: number;
  lo: number;
  hi: number;
  seconds: number;
  segments: number;
  /** Segments of the log with the fewest in this band (what one log's scatter is judged by). */
  segmentsPerLog: number;
  meanThrottle: number;
  axes: Record<Axis, BaselineAxisBand>;
  motors: BaselineMotorBand[];
}

export interface BaselineMode {
  axis: Axis;
  freqHz: number;
  levelDb: number;
  /** Range of the mode's frequency over the logs, percent of freqHz. */
  spreadPct: number;
  /** Logs the mode was found in. */
  seenIn: number;
  /** The mode in each baseline throttle band it shows in (version 2): where to look for it there. */
  bands?: { index: number; freqHz: number; levelDb: number }[];
}

/** One motor's orders at one rotation rate, pooled over the baseline logs (see RpmBinLevels). */
export interface BaselineRpmBin {
  bin: number;
  rotationHz: number;
  /** Blocks behind it, summed over the logs. */
  blocks: number;
  /** Per order: power per axis (and sidebands per axis for whole orders), dB, power mean over the logs weighted by their blocks. */
  orders: { order: number; db: Record<Axis, number>; sideDb?: Record<Axis, number> }[];
}

/**
 * 2: modes per band, every order with sidebands, per-bin log spread, recurring known peaks,
 * unusable axes and untrusted motors. Fields added in 2 are optional, so stored baselines of
 * version 1 still decode (their known-peak list is every peak they saw: set the baseline again
 * to get the recurring ones). 3: the order generation of its logs. 4: its logs' sample rates
 * (orders above the Nyquist frequency are compared where they fold only against logs of the
 * same rate).
 */
export const BASELINE_VERSION = 4;

export interface Baseline {
  version: 1 | 2 | 3 | 4;
  /**
   * How its logs' motor orders were measured (version 3; see orderGeneration): 1 or 2, or 0 when
   * its logs mix both, whose levels cannot be pooled. Absent: built before, from generation 1.
   */
  orderGeneration?: 0 | 1 | 2;
  logs: number;
  /** The lowest of its logs' sample rates. */
  sampleRateHz: number;
  /** Each log's sample rate, Hz (version 4). */
  logRatesHz?: number[];
  binHz: number;
  minFreqHz: number;
  /** Top of the range every baseline log covers. */
  maxFreqHz: number;
  floorCornerHz: number;
  bands: FrequencyBand[];
  hasThrottle: boolean;
  motors: number[];
  throttleBands: BaselineThrottleBand[];
  modes: BaselineMode[];
  /** Each motor's orders by its own rotation rate (optional: baselines built before have none). */
  rpmMaps?: { motor: number; bins: BaselineRpmBin[] }[];
  /** Motors whose rpm telemetry was masked in more than half of some baseline log. */
  untrustedMotors?: number[];
  /** Axes that some baseline log could not use (no signal, clipped …): never compared. */
  unusableAxes?: { axis: Axis; reason: string }[];
  /**
   * Known peaks per axis: the ones that recur (version 2; see {@link recurringPeaks}). Version 1
   * kept every peak of every band and log, which covered most of the frequency axis.
   */
  peaks: Record<Axis, number[]>;
}

/** A throttle band needs as many segments to enter a baseline as the analysis needs to search it. */
const MIN_BAND_SEGMENTS = DEFAULT_ANALYSIS.minBandSegments;
/**
 * Prominence above the local median at which a known mode is followed (half the 6 dB gate for
 * finding peaks anywhere): near a frequency where a mode is expected, a smaller bump is enough.
 */
export const MODE_TRACK_PROMINENCE_DB = 3;
/** Modes within this fraction of each other across logs are one mode. */
const MODE_CLUSTER_FRACTION = 0.04;

/**
 * Builds a baseline from analyses of known-good logs of one airframe. Throws InputError when
 * given none or when the logs were analysed with different band layouts.
 */
/** The order generation its logs share, or 0 when they mix two. */
function baselineOrderGeneration(analyses: readonly LogAnalysis[]): 0 | 1 | 2 {
  const generations = new Set(analyses.map((a) => orderGeneration(a.version)));
  const [only] = generations;
  return generations.size === 1 && only !== undefined ? only : 0;
}

export function buildBaseline(analyses: readonly LogAnalysis[]): Baseline {
  const first = analyses[0];
  if (!first) throw new InputError("a baseline needs at least one known-good log");
  const throttleCount = first.throttleBands.length;
  for (const a of analyses) {
    if (a.throttleBands.length !== throttleCount) {
      throw new InputError(
        "the baseline logs were analysed with different throttle bands; analyse them again with the same settings",
      );
    }
  }
  const maxFreqHz = Math.min(...analyses.map((a) => a.settings.maxFreqHz));
  const sampleRateHz = Math.min(...analyses.map((a) => a.sampleRateHz));
  const lowest = analyses.find((a) => a.sampleRateHz === sampleRateHz) ?? first;
  const bands = lowest.bands.filter((b) => b.hiHz <= maxFreqHz);
  const floorCornerHz = Math.max(...analyses.map((a) => a.settings.floorCornerHz));
  const binHz = lowest.settings.binHz;
  const gridBins = Math.floor(maxFreqHz / binHz) + 1;
  const motors = first.motors
    .map((m) => m.motor)
    .filter((m) => analyses.every((a) => a.motors.some((x) => x.motor === m)));

  const throttleBands: BaselineThrottleBand[] = [];
  for (let index = 0; index < throttleCount; index++) {
    const parts = analyses
      .map((a) => ({ a, band: a.throttleBands[index] }))
      .filter(
        (p): p is { a: LogAnalysis; band: NonNullable<typeof p.band> } =>
          !!p.band && p.band.segments >= MIN_BAND_SEGMENTS,
      );
    if (parts.length === 0) continue;
    const ref = parts[0]?.band;
    if (!ref) continue;
    const segments = parts.reduce((s, p) => s + p.band.segments, 0);
    const axes = {} as Record<Axis, BaselineAxisBand>;
    for (const axis of AXES) {
      const perLog = parts.map((p) => bandLevelsOn(p.a, p.band.axes[axis].bandDb, bands));
      const spreads = parts.map((p) => bandLevelsOn(p.a, p.band.axes[axis].bandSpreadDb, bands));
      const floors = parts.map((p) => p.band.axes[axis].floorDb);
      axes[axis] = {
        bandDb: bands.map((_, b) => mean(perLog.map((l) => l[b] ?? Number.NaN))),
        segmentSpreadDb: bands.map((_, b) => Math.sqrt(mean(spreads.map((s) => (s[b] ?? 0) ** 2)))),
        logSpreadDb: bands.map((_, b) => stdDev(perLog.map((l) => l[b] ?? Number.NaN))),
        floorDb: mean(floors),
        floorLogSpreadDb: stdDev(floors),
        psdDb: Array.from({ length: gridBins }, (_, k) =>
          round(
            mean(parts.map((p) => dbAt(p.band.axes[axis].psdDb, p.a.settings.binHz, k * binHz))),
            2,
          ),
        ),
        psdLogSpreadDb: Array.from({ length: gridBins }, (_, k) =>
          round(
            stdDev(parts.map((p) => dbAt(p.band.axes[axis].psdDb, p.a.settings.binHz, k * binHz))),
            1,
          ),
        ),
      };
    }
    const motorBands: BaselineMotorBand[] = motors.map((motor) => {
      const found = parts.map((p) => p.band.motors.find((m) => m.motor === motor));
      const orderSet = [...new Set(found.flatMap((m) => m?.orders.map((o) => o.order) ?? []))].sort(
        (x, y) => x - y,
      );
      const orders: BaselineOrder[] = orderSet.map((order) => {
        const levels = found.map((m) => m?.orders.find((o) => o.order === order)?.powerDb);
        const db = {} as Record<Axis, number>;
        for (const axis of AXES) db[axis] = powerMeanDb(levels.map((o) => o?.[axis] ?? Number.NaN));
        const blocks = found.reduce(
          (s, m) => s + Math.max(0, (m?.blocks ?? 0) - (m?.maskedBlocks ?? 0)),
          0,
        );
        const sides = found.map((m) => m?.orders.find((o) => o.order === order)?.sideDb);
        const sideDb = {} as Record<Axis, number>;
        for (const axis of AXES)
          sideDb[axis] = powerMeanDb(sides.map((o) => o?.[axis] ?? Number.NaN));
        return {
          order,
          db,
          sideDb,
          logSpreadDb: Math.max(
            ...AXES.map((axis) => stdDev(levels.map((o) => o?.[axis] ?? Number.NaN))),
          ),
          blocks,
        };
      });
      const one = orders.find((o) => o.order === 1);
      return {
        motor,
        meanRpm: mean(found.map((m) => (m && m.meanRpm > 0 ? m.meanRpm : Number.NaN))),
        order1Db: one?.db ?? { roll: Number.NaN, pitch: Number.NaN, yaw: Number.NaN },
        logSpreadDb: one?.logSpreadDb ?? 0,
        orders,
      };
    });
    throttleBands.push({
      index,
      lo: ref.lo,
      hi: ref.hi,
      seconds: parts.reduce((s, p) => s + p.band.seconds, 0),
      segments,
      segmentsPerLog: Math.min(...parts.map((p) => p.band.segments)),
      meanThrottle: parts.reduce((s, p) => s + p.band.meanThrottle * p.band.segments, 0) / segments,
      axes,
      motors: motorBands,
    });
  }
  if (throttleBands.length === 0) {
    throw new InputError(
      `no throttle band has ${MIN_BAND_SEGMENTS} analysis segments in the baseline logs; fly longer baseline logs`,
    );
  }

  const peaks = {} as Record<Axis, number[]>;
  const modes: BaselineMode[] = [];
  for (const axis of AXES) {
    peaks[axis] = recurringPeaks(analyses, axis, maxFreqHz);
    const structural = analyses.map((a) =>
      a.axes[axis].peaks.filter((p) => p.kind === "structural" && p.freqHz <= maxFreqHz),
    );
    for (const cluster of clusterModes(structural)) {
      // A mode must show in most baseline logs (all of two, two of three …) to be trusted.
      if (cluster.length < Math.ceil((2 * analyses.length) / 3)) continue;
      const freqs = cluster.map((p) => p.freqHz);
      const f = median(freqs);
      modes.push({
        axis,
        freqHz: round(f, 2),
        levelDb: round(mean(cluster.map((p) => p.levelDb)), 2),
        spreadPct: round(((Math.max(...freqs) - Math.min(...freqs)) / f) * 100, 2),
        seenIn: cluster.length,
        bands: modeInBands(throttleBands, axis, f, binHz),
      });
    }
  }

  const unusableAxes = AXES.flatMap((axis) => {
    const bad = analyses.find((a) => a.axes[axis].signal?.usable === false);
    return bad ? [{ axis, reason: bad.axes[axis].signal?.text ?? "no usable signal" }] : [];
  });
  if (unusableAxes.length === AXES.length) {
    throw new InputError(
      `no gyro axis carries a usable signal in every baseline log (${unusableAxes.map((u) => `${u.axis}: ${u.reason}`).join("; ")}); choose other logs`,
    );
  }

  return {
    version: BASELINE_VERSION,
    orderGeneration: baselineOrderGeneration(analyses),
    unusableAxes,
    untrustedMotors: motors.filter((motor) =>
      analyses.some(
        (a) =>
          (a.motors.find((m) => m.motor === motor)?.maskedShare ?? 0) >
          DEFAULT_THRESHOLDS.maxMaskedShare,
      ),
    ),
    ...(analyses.every((a) => a.motors.every((m) => m.rpmMap))
      ? { rpmMaps: motors.map((motor) => ({ motor, bins: pooledRpmMap(analyses, motor) })) }
      : {}),
    logs: analyses.length,
    sampleRateHz,
    logRatesHz: analyses.map((a) => a.sampleRateHz),
    binHz,
    minFreqHz: first.settings.minFreqHz,
    maxFreqHz,
    floorCornerHz,
    bands,
    hasThrottle: analyses.every((a) => a.hasThrottle),
    motors,
    throttleBands,
    modes,
    peaks,
  };
}

/**
 * Where a mode sits in each throttle band of the baseline: the peak above the local median
 * nearest to its all-throttle frequency within ±MODE_CLUSTER_FRACTION, if any.
 */
function modeInBands(
  bands: BaselineThrottleBand[],
  axis: Axis,
  freqHz: number,
  binHz: number,
): { index: number; freqHz: number; levelDb: number }[] {
  const out: { index: number; freqHz: number; levelDb: number }[] = [];
  for (const b of bands) {
    const found = peaksAboveLocalMedian(
      b.axes[axis].psdDb,
      binHz,
      freqHz * (1 - MODE_CLUSTER_FRACTION),
      freqHz * (1 + MODE_CLUSTER_FRACTION),
      MODE_TRACK_PROMINENCE_DB,
    );
    const best = found.sort((x, y) => Math.abs(x.freqHz - freqHz) - Math.abs(y.freqHz - freqHz))[0];
    if (best)
      out.push({ index: b.index, freqHz: round(best.freqHz, 2), levelDb: round(best.levelDb, 2) });
  }
  return out;
}

/** A peak is known when it recurs in at least this share of the baseline's (log, band) spectra. */
const KNOWN_PEAK_SHARE = 0.5;
/** Peaks within this fraction of each other are one peak for the recurrence count. */
const SAME_PEAK_FRACTION = 0.03;

/**
 * The peaks of a baseline that recur: a peak counts as known when, in at least half of the
 * baseline's (log × throttle band) spectra with enough segments, and in at least two of them, a
 * peak lies within ±3 % of it. A resonance of the airframe shows up in most of them; a noise
 * peak of one sparse band falls at a random frequency and does not recur (with k spectra, a
 * ±3 % coincidence by chance in half of them is rare), and a motor order moves with throttle.
 */
export function recurringPeaks(
  analyses: readonly LogAnalysis[],
  axis: Axis,
  maxFreqHz: number,
): number[] {
  const cells = analyses.flatMap((a) =>
    a.throttleBands
      .filter((b) => b.segments >= MIN_BAND_SEGMENTS)
      .map((b) => b.axes[axis].peaks.map((p) => p.freqHz)),
  );
  const need = Math.max(2, Math.ceil(KNOWN_PEAK_SHARE * cells.length));
  const known: number[] = [];
  for (const f of cells.flat().sort((x, y) => x - y)) {
    if (f > maxFreqHz || known.some((k) => Math.abs(k - f) <= SAME_PEAK_FRACTION * f)) continue;
    const hits = cells
      .map((c) => c.filter((g) => Math.abs(g - f) <= SAME_PEAK_FRACTION * f))
      .filter((c) => c.length > 0);
    if (hits.length >= need) known.push(round(median(hits.map((c) => c[0] ?? f)), 1));
  }
  return known;
}

/** A motor's rpm bins pooled over the logs: blocks summed, levels power-averaged by blocks. */
function pooledRpmMap(analyses: readonly LogAnalysis[], motor: number): BaselineRpmBin[] {
  const byBin = new Map<number, RpmBinLevels[]>();
  for (const a of analyses)
    for (const b of a.motors.find((m) => m.motor === motor)?.rpmMap ?? []) {
      const parts = byBin.get(b.bin);
      if (parts) parts.push(b);
      else byBin.set(b.bin, [b]);
    }
  return [...byBin.entries()]
    .sort((x, y) => x[0] - y[0])
    .map(([bin, parts]) => {
      const blocks = parts.reduce((s, p) => s + p.blocks, 0);
      const weights = parts.map((p) => p.blocks);
      const pooled = (level: (p: RpmBinLevels) => Record<Axis, number> | undefined) => {
        const out = {} as Record<Axis, number>;
        for (const axis of AXES)
          out[axis] = round(
            powerMeanDb(
              parts.map((p) => level(p)?.[axis] ?? Number.NaN),
              weights,
            ),
            3,
          );
        return out;
      };
      const orders = (parts[0]?.orders ?? []).map(({ order }) => {
        const of = (p: RpmBinLevels) => p.orders.find((o) => o.order === order);
        const db = pooled((p) => of(p)?.powerDb);
        return { order, db, sideDb: pooled((p) => of(p)?.sideDb) };
      });
      return {
        bin,
        rotationHz: round(parts.reduce((s, p) => s + p.rotationHz * p.blocks, 0) / blocks, 2),
        blocks,
        orders,
      };
    });
}

/** Power mean of dB levels (the mean of the powers, in dB), weighted if weights are given, skipping NaN. */
function powerMeanDb(values: readonly number[], weights?: readonly number[]): number {
  let sum = 0;
  let total = 0;
  values.forEach((x, i) => {
    if (!Number.isFinite(x)) return;
    const w = weights?.[i] ?? 1;
    sum += w * 10 ** (x / 10);
    total += w;
  });
  return total > 0 ? 10 * Math.log10(sum / total) : Number.NaN;
}

/** A log's per-band values re-indexed onto the baseline's bands (logs may have more bands). */
function bandLevelsOn(a: LogAnalysis, values: number[], bands: FrequencyBand[]): number[] {
  return bands.map((b) => {
    const i = a.bands.findIndex((x) => x.loHz === b.loHz && x.hiHz === b.hiHz);
    return i >= 0 ? (values[i] ?? Number.NaN) : Number.NaN;
  });
}

function clusterModes(
  perLog: { freqHz: number; levelDb: number }[][],
): { freqHz: number; levelDb: number }[][] {
  const clusters: { freqHz: number; levelDb: number }[][] = [];
  for (const peaks of perLog) {
    for (const p of peaks) {
      const home = clusters.find(
        (c) => Math.abs((c[0]?.freqHz ?? 0) - p.freqHz) <= MODE_CLUSTER_FRACTION * p.freqHz,
      );
      if (home) home.push(p);
      else clusters.push([p]);
    }
  }
  return clusters;
}

/** Level of a dB spectrum with spacing binHz at a frequency, linearly interpolated. */
export function dbAt(psdDb: readonly number[], binHz: number, freqHz: number): number {
  const pos = freqHz / binHz;
  const i = Math.floor(pos);
  if (i < 0) return psdDb[0] ?? Number.NaN;
  if (i >= psdDb.length - 1) return psdDb[psdDb.length - 1] ?? Number.NaN;
  const t = pos - i;
  return (psdDb[i] ?? 0) * (1 - t) + (psdDb[i + 1] ?? 0) * t;
}
