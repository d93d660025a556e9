import type { Axis } from "../logs/columns";
import type { Status } from "./thresholds";

/** What a comparison of one log with its airframe's baseline reports (lib/health/compare.ts). */

export type FindingKind =
  "mode-shift" | "mode-lost" | "new-peak" | "band-rise" | "floor-rise" | "motor-order";

export interface Finding {
  axis: Axis;
  kind: FindingKind;
  freqHz: number;
  baselineFreqHz?: number;
  deltaDb?: number;
  shiftPct?: number;
  motor?: number;
  /** motor-order: the order that rose most (1 = the rotation rate) and every order that rose. */
  order?: number;
  orders?: number[];
  /**
   * motor-order: a prop (whole orders only) or a loose motor (half orders too); floor-rise:
   * "frame" when modes dropped on several frequencies at once explain it.
   */
  cause?: "prop" | "motor-mount" | "frame";
  severity: Exclude<Status, "ok">;
  /** Points this finding took off the score. */
  points: number;
  text: string;
}

export interface NotCompared {
  what: string;
  reason: string;
}

export interface Assessment {
  score: number;
  status: Status;
  findings: Finding[];
  notCompared: NotCompared[];
  /** Throttle bands compared, as "38–50 %". */
  comparedBands: string[];
}
