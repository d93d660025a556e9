// One analysis job: read a stored log from disk with progress, analyse it, report the result as
// messages. Runs inside a worker thread (worker-entry.ts) or, with HEATCHECK_WORKERS=0, inline.
import { createReadStream, statSync } from "node:fs";
import { isDomainError } from "../errors";
import { parseColumnMap } from "../logs/columns";
import type { Baseline } from "../health/baseline";
import { compareWithPositions, type Assessment } from "../health/compare";
import { analyzeLog } from "./analyze-log";
import type { LogAnalysis } from "./types";

export interface AnalysisJob {
  jobId: string;
  path: string;
  mapText?: string | null;
  maxBytes: number;
  /** The airframe's active baseline as stored, to compare the result with here rather than on
   * the server's event loop; absent when the airframe has none. */
  baseline?: { id: string; json: string };
}

/** What a finished job reports beside the stored JSON, so the server need not parse it. */
export interface AnalysisOutcome {
  analysisJson: string;
  sampleRateHz: number;
  durationS: number;
  /** The comparison with `job.baseline`, made from the analysis as stored (5 digits). */
  compared?: { baselineId: string; assessment: Assessment };
}

export type WorkerMessage =
  | { type: "progress"; jobId: string; fraction: number }
  | ({ type: "done"; jobId: string } & AnalysisOutcome)
  | { type: "failed"; jobId: string; message: string; badInput: boolean };

async function* withProgress(
  path: string,
  onFraction: (f: number) => void,
): AsyncGenerator<Uint8Array> {
  const total = statSync(path).size || 1;
  let read = 0;
  let reported = 0;
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) {
    read += (chunk as Uint8Array).length;
    if (read / total - reported >= 0.02) {
      reported = read / total;
      onFraction(reported);
    }
    yield chunk as Uint8Array;
  }
}

export async function runJob(job: AnalysisJob, post: (m: WorkerMessage) => void): Promise<void> {
  try {
    const map = job.mapText ? parseColumnMap(job.mapText) : undefined;
    const { analysis } = await analyzeLog(
      withProgress(job.path, (fraction) => post({ type: "progress", jobId: job.jobId, fraction })),
      { map, maxBytes: job.maxBytes },
    );
    const analysisJson = JSON.stringify(analysis, compactNumbers);
    // Compared as stored (5 digits), as the server would compare it after reading it back.
    const compared = job.baseline && {
      baselineId: job.baseline.id,
      assessment: compareWithPositions(
        JSON.parse(analysisJson) as LogAnalysis,
        JSON.parse(job.baseline.json) as Baseline,
      ),
    };
    post({
      type: "done",
      jobId: job.jobId,
      analysisJson,
      sampleRateHz: analysis.sampleRateHz,
      durationS: analysis.durationS,
      ...(compared ? { compared } : {}),
    });
  } catch (e) {
    post({
      type: "failed",
      jobId: job.jobId,
      message: e instanceof Error ? e.message : String(e),
      badInput: isDomainError(e),
    });
  }
}

/** Spectra are stored with 5 significant digits: far finer than any finding needs. */
function compactNumbers(_key: string, value: unknown): unknown {
  return typeof value === "number" && Number.isFinite(value) && !Number.isInteger(value)
    ? Number(value.toPrecision(5))
    : value;
}
