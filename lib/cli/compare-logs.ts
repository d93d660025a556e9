import type { LogAnalysis } from "../analysis/types";
import { buildBaseline } from "../health/baseline";
import { compareWithPositions, type Assessment } from "../health/compare";

/**
 * What `compare` does once the logs are analysed: a baseline from the known-good logs, then the
 * log held against it, motors named by position. The validation matrix calls this same function.
 */
export function compareAnalyses(log: LogAnalysis, good: readonly LogAnalysis[]): Assessment {
  return compareWithPositions(log, buildBaseline([...good]));
}
