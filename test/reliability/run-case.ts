/**
 * Runs one corpus case through the reader and the analyser in this process, the way the CLI's
 * `analyze` does (map text parsed first, then the file streamed), in chunks of the given sizes.
 */
import { analyzeLog } from "../../lib/analysis/analyze-log";
import { isDomainError, LogFormatError } from "../../lib/errors";
import { parseColumnMap } from "../../lib/logs/columns";
import type { CorpusCase } from "./corpus";

export type Outcome =
  | {
      outcome: "accepted";
      samples: number;
      sampleRateHz: number;
      gaps: number;
      droppedRows: number;
    }
  | {
      outcome: "rejected";
      stage: "map" | "read" | "analysis";
      code: string;
      message: string;
      line?: number;
      column?: number;
    }
  | { outcome: "unexpected"; message: string };

/** Chunks of the bytes, their sizes drawn from `size(i)` (bytes, at least 1). */
export async function* chunked(
  bytes: Uint8Array,
  size: (i: number) => number,
): AsyncGenerator<Uint8Array> {
  let at = 0;
  for (let i = 0; at < bytes.length; i++) {
    const n = Math.max(1, Math.floor(size(i)));
    // One turn of the event loop per chunk, as a file stream would give.
    await Promise.resolve();
    yield bytes.subarray(at, Math.min(bytes.length, at + n));
    at += n;
  }
}

export async function runCaseInProcess(
  c: CorpusCase,
  size: (i: number) => number = () => 1 << 20,
): Promise<Outcome> {
  let map;
  try {
    map = c.map ? parseColumnMap(c.map) : undefined;
  } catch (e) {
    if (isDomainError(e))
      return { outcome: "rejected", stage: "map", code: e.code, message: e.message };
    return { outcome: "unexpected", message: String(e) };
  }
  let readDone = false;
  try {
    const { analysis, summary } = await analyzeLog(
      (async function* () {
        yield* chunked(c.bytes, size);
        readDone = true;
      })(),
      { map, maxBytes: (c.maxMb ?? 512) * 1024 * 1024 },
    );
    return {
      outcome: "accepted",
      samples: analysis.samples,
      sampleRateHz: summary.info.sampleRateHz,
      gaps: summary.gapCount,
      droppedRows: summary.droppedRows,
    };
  } catch (e) {
    if (!isDomainError(e))
      return {
        outcome: "unexpected",
        message: e instanceof Error ? `${e.name}: ${e.message}\n${e.stack ?? ""}` : String(e),
      };
    // The analyser's own refusals come after the whole file was read (its finish step).
    const stage = readDone && /one analysis segment needs/.test(e.message) ? "analysis" : "read";
    const location = e instanceof LogFormatError ? e.location : {};
    return {
      outcome: "rejected",
      stage,
      code: e.code,
      message: e.message,
      line: location.line,
      column: location.column,
    };
  }
}
