import type { LogAnalysis, ThrottleBandResult } from "../../analysis/types";
import type { Axis } from "../../logs/columns";
import type { Baseline, BaselineThrottleBand } from "../baseline";
import type { Finding } from "../findings";
import type { HealthThresholds } from "../thresholds";
import type { OrderEvidence } from "./order-evidence";

/** A throttle band of the log and the baseline's band at the same index. */
export interface MatchedBand {
  log: ThrottleBandResult;
  base: BaselineThrottleBand;
  /** "38–50 %". */
  label: string;
}

/**
 * Everything a detector reads, built once per comparison (lib/health/compare.ts). Every detector
 * takes this one argument; `found` holds the findings of the detectors run before it, which a
 * later detector must not report again.
 */
export interface DetectorContext {
  log: LogAnalysis;
  baseline: Baseline;
  thresholds: HealthThresholds;
  /** Axes with a usable signal in both the log and the baseline. */
  axes: readonly Axis[];
  /** Throttle bands both cover with enough data. */
  matched: readonly MatchedBand[];
  /** Top of the frequency range both can show, Hz. */
  maxHz: number;
  /** The floor's corner over that range (the baseline's, lowered as the analysis does), Hz. */
  cornerHz: number;
  /** Names of motor positions for the sentences, e.g. { 3: "rear-right" }. */
  positions: Readonly<Record<number, string>>;
  /** How each tracked motor order stands against its own baseline and the other motors. */
  orders: OrderEvidence;
  /** Findings of the detectors that ran before this one. */
  found: readonly Finding[];
}
