import type { ReadOptions, ReadSummary } from "../logs/read-log";
import { readLog } from "../logs/read-log";
import { LogAnalyzer } from "./analyzer";
import type { AnalysisSettings } from "./settings";
import type { LogAnalysis } from "./types";

export interface AnalyzeOptions extends ReadOptions {
  settings?: Partial<AnalysisSettings>;
}

/** Reads and analyses a log in one streaming pass. Throws LogFormatError / LimitExceededError. */
export async function analyzeLog(
  source: AsyncIterable<Uint8Array>,
  options: AnalyzeOptions = {},
): Promise<{ analysis: LogAnalysis; summary: ReadSummary }> {
  const analyzer = new LogAnalyzer(options.settings);
  const summary = await readLog(source, analyzer, options);
  return { analysis: analyzer.finish(summary), summary };
}

/** A byte source over an in-memory buffer, in chunks as a file stream would deliver them. */
export function bytesSource(bytes: Uint8Array, chunkSize = 1 << 16): AsyncIterable<Uint8Array> {
  return {
    async *[Symbol.asyncIterator]() {
      for (let i = 0; i < bytes.length; i += chunkSize) {
        // One turn of the event loop per chunk, as a stream would give.
        await Promise.resolve();
        yield bytes.subarray(i, Math.min(bytes.length, i + chunkSize));
      }
    },
  };
}
