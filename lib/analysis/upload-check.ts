// The check an upload passes while it streams in: the log reader over the bytes, plus what the
// analysis needs beyond a readable file. Runs in the upload-check worker thread
// (upload-check-worker.ts) or, with HEATCHECK_WORKERS=0, on the server's own thread.
import { parseColumnMap } from "../logs/columns";
import { readLog } from "../logs/read-log";
import type { LogSink, ReadSummary } from "../logs/types";
import { defaultNperseg } from "../signal/welch";
import { noSegmentError } from "./plan";
import { DEFAULT_ANALYSIS } from "./settings";

export interface UploadCheckOptions {
  /** The upload's column map, as typed (already known to parse). */
  mapText?: string;
  /** Size limit in bytes, checked while streaming. */
  maxBytes: number;
}

/**
 * Reads an upload as the analysis will and refuses it with a located LogFormatError when it cannot
 * be read or holds no analysis segment in one stretch without a gap (the analyser's default
 * segment length at this rate).
 */
export async function checkUpload(
  source: AsyncIterable<Uint8Array>,
  options: UploadCheckOptions,
): Promise<ReadSummary> {
  const runs = new SegmentRuns();
  const map = options.mapText ? parseColumnMap(options.mapText) : undefined;
  const summary = await readLog(source, runs, { map, maxBytes: options.maxBytes });
  runs.requireOneSegment(summary);
  return summary;
}

/** The longest run of samples without a gap, counted as the blocks pass. */
class SegmentRuns implements LogSink {
  private rate = 0;
  private run = 0;
  private longest = 0;
  begin(info: { sampleRateHz: number }): void {
    this.rate = info.sampleRateHz;
  }
  block(block: { length: number }): void {
    this.run += block.length;
    if (this.run > this.longest) this.longest = this.run;
  }
  gap(): void {
    this.run = 0;
  }
  requireOneSegment(summary: ReadSummary): void {
    const nperseg = DEFAULT_ANALYSIS.nperseg ?? defaultNperseg(this.rate);
    if (this.longest >= nperseg) return;
    throw noSegmentError(summary, this.rate, nperseg);
  }
}
