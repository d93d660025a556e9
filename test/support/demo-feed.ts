import type { AnalysisSettings } from "@/lib/analysis/settings";
import type { LogAnalysis } from "@/lib/analysis/types";
import { analyzeDemoLog, type FeedBlock } from "@/lib/demo/analyze-demo";
import type { DemoLogOptions } from "@/lib/demo/generator";

export type { FeedBlock };

/**
 * A demo log fed to the analyser with a test's own change applied to every block (a broken
 * telemetry channel, a stuck gyro …): generated cases for the unit tests, not demo data. Blocks of
 * 4096 samples and no set-points, as these tests were written for.
 */
export function analyzeWith(
  options: DemoLogOptions,
  transform: (b: FeedBlock) => void,
  settings: Partial<AnalysisSettings> = {},
): LogAnalysis {
  return analyzeDemoLog(options, settings, { blockSize: 4096, hasSetpoint: false, transform })
    .analysis;
}
