import type { Axis } from "../logs/columns";
import type { Gap } from "../logs/read-log";
import type { FrequencyBand } from "../signal/bands";
import type { SpectralPeak } from "../signal/peaks";
import type { Averaging } from "../signal/welch";
import type { WindowName } from "../signal/windows";
import type { MaskReason } from "./order-tracker";

/** structural: stays put across throttle · motor: moves with rpm/throttle · unclassified: cannot tell. */
export type PeakKind = "structural" | "motor" | "unclassified";

export interface LabelledPeak extends SpectralPeak {
  kind: PeakKind;
  /** Throttle bands (indices) in which the peak was seen. */
  seenInBands: number[];
}

/** Why an axis's signal cannot be used: it is then not compared. */
export type SignalProblem = "constant" | "flat" | "clipped" | "out-of-range";

export interface SignalCheck {
  usable: boolean;
  problem?: SignalProblem;
  /** One sentence for people, when not usable. */
  text?: string;
  /** Share of samples at the axis's own minimum or maximum value. */
  clippedShare: number;
  minDegS: number;
  maxDegS: number;
}

export interface AxisResult {
  /** Whether the axis carries a usable signal (absent in analyses stored before version 2). */
  signal?: SignalCheck;
  /** One-sided PSD, (deg/s)²/Hz, on the shared frequency grid. */
  psd: number[];
  peaks: LabelledPeak[];
  /** Power in each analysis band, (deg/s)². */
  bandPower: number[];
  /** Median density above the floor corner, dB re 1 (deg/s)²/Hz. */
  floorDb: number;
  /** RMS over the analysed range (minFreqHz..maxHz), deg/s. */
  rmsDegS: number;
}

/** The levels of one motor order in one throttle band: power in dB re 1 (deg/s)², per axis. */
export interface OrderLevel {
  /** A multiple of the motor's rotation: 0.5, 1, 1.5 … 4 and the blade pass (version 1: 1, 2, blade pass). */
  order: number;
  /** "0.5x" … "4x", or "blade-pass" for the order equal to the blade count. */
  label: string;
  freqHz: number;
  /** The exact order's power, the median over the band's measured blocks. */
  powerDb: Record<Axis, number>;
  /**
   * Beside the order (version 2), dB: for a whole order the strongest tone 0.05–0.25 orders away
   * (sidebands); for a half order the strongest tone within ±0.25 orders (the order spectrum
   * between the whole orders). Analyses stored before the half orders were measured exactly
   * carry that strongest tone as the half order's powerDb and have no sideDb for it.
   */
  sideDb?: Record<Axis, number>;
}

export interface MotorInBand {
  motor: number;
  /** Mean rpm over the motor's measured blocks. */
  meanRpm: number;
  /** Order-tracking blocks in this band, and how many of them this motor's telemetry masked. */
  blocks?: number;
  maskedBlocks?: number;
  orders: OrderLevel[];
}

export interface ThrottleBandAxis {
  /** Mean PSD of the band's segments, dB re 1 (deg/s)²/Hz, rounded to 0.01 dB. */
  psdDb: number[];
  /** Band power in dB, mean over segments, and its spread (standard deviation) over segments. */
  bandDb: number[];
  bandSpreadDb: number[];
  floorDb: number;
  peaks: SpectralPeak[];
}

export interface ThrottleBandResult {
  index: number;
  lo: number;
  hi: number;
  /** Time the throttle spent in this band, s. */
  seconds: number;
  /** Welch segments whose mean throttle fell in this band. */
  segments: number;
  meanThrottle: number;
  axes: Record<Axis, ThrottleBandAxis>;
  motors: MotorInBand[];
}

export interface MotorTrackPoint {
  tS: number;
  rotationHz: number;
  /** 1× order power, dB, the largest over the three axes. */
  order1Db: number;
}

/**
 * One motor's orders at one rotation rate over the whole log: the blocks whose mean rotation fell
 * in one bin of RPM_MAP (lib/analysis/settings.ts), each order the median over them.
 */
export interface RpmBinLevels {
  /** The bin: rotation rate from RPM_MAP.baseHz·(1 + RPM_MAP.step)^bin up to the next bin. */
  bin: number;
  /** Mean rotation rate of the bin's blocks, Hz. */
  rotationHz: number;
  blocks: number;
  orders: Pick<OrderLevel, "order" | "powerDb" | "sideDb">[];
}

export interface MotorSummary {
  motor: number;
  meanRpm: number;
  /** Share of the log's order-tracking blocks whose rpm telemetry was not believable. */
  maskedShare?: number;
  /** Masked blocks by reason: rpm 0, outside the plausible range, stuck, changing impossibly fast. */
  maskedBlocks?: Record<MaskReason, number>;
  /** The motor's 1× order through the log, at most a few hundred points. */
  track: MotorTrackPoint[];
  /**
   * The motor's orders by its own rotation rate (version 2, optional): what the comparison holds
   * against the baseline at the same rpm, so that the frame's response at the order's frequency
   * is the same on both sides.
   */
  rpmMap?: RpmBinLevels[];
}

/**
 * 2: signal checks per axis, rpm masking, more motor orders, per-bin scatter per throttle band.
 * Every field added in 2 is optional in the type, so analyses stored as 1 still decode.
 * 3: motor orders measured on the high-passed gyro (lib/analysis/order-bands.ts). Same fields,
 * but the levels of earlier analyses read higher, so the two are never compared with each other
 * ({@link orderGeneration}).
 * 4: whole orders above the Nyquist frequency measured where they fold (lib/analysis/order-tracker.ts);
 * orders measured before are measured the same way.
 */
export const ANALYSIS_VERSION = 4;

/**
 * Which way an analysis of `version` measured its motor orders: 1 before version 3 (on the gyro
 * as logged, where a manoeuvre leaked into them), 2 from version 3 on. Order levels of different
 * generations are not comparable.
 */
export function orderGeneration(version: number): 1 | 2 {
  return version >= 3 ? 2 : 1;
}

export interface LogAnalysis {
  version: 1 | 2 | 3 | 4;
  sampleRateHz: number;
  durationS: number;
  samples: number;
  gaps: Gap[];
  droppedRows: number;
  metadata: Record<string, string>;
  guesses: string[];
  settings: {
    nperseg: number;
    noverlap: number;
    window: WindowName;
    average: Averaging;
    binHz: number;
    bladeCount: number;
    minFreqHz: number;
    /** Top of the trusted range: 90 % of Nyquist. */
    maxFreqHz: number;
    floorCornerHz: number;
  };
  segments: number;
  freqHz: number[];
  bands: FrequencyBand[];
  axes: Record<Axis, AxisResult>;
  hasThrottle: boolean;
  throttleBands: ThrottleBandResult[];
  motors: MotorSummary[];
}
