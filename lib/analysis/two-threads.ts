import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { deferred } from "../deferred";
import { LogFormatError } from "../errors";
import type {
  Gap,
  LogInfo,
  LogSink,
  ReadOptions,
  ReadSummary,
  SampleBlock,
} from "../logs/read-log";
import { readLog } from "../logs/read-log";
import { LogAnalyzer } from "./analyzer";
import type { AnalysisSettings } from "./settings";
import type { LogAnalysis } from "./types";

/**
 * The analysis split over two threads: this thread reads and parses the CSV, a worker thread runs
 * the analyser on what it is sent. On a 2-core pit laptop parsing and spectra then overlap.
 *
 * Memory stays flat however long the log and however many gaps it has: rows are copied into
 * batches of BATCH_ROWS rows whose buffers travel to the worker and back (transferred, not cloned),
 * and a batch also carries the gaps between its rows, so a log where every step is a gap still
 * makes one message per BATCH_ROWS rows. The file is fed to the reader in pieces of at most
 * PIECE_BYTES, and no next piece is read while more than MAX_IN_FLIGHT batches wait in the worker.
 * A piece holds at most PIECE_BYTES / 8 rows (a row is at least "t,r,p,y\n"), so it fills at most
 * two batches: at most MAX_IN_FLIGHT + 3 buffer sets ever exist.
 *
 * The worker is the calling program's own entry module started again with a marker in workerData
 * (see {@link runAnalysisThreadIfWorker}), so the same file serves as TypeScript under tsx and as
 * one bundled .mjs.
 */

const ROLE = "heatcheck-analysis-thread";
const MAX_IN_FLIGHT = 4;
const BATCH_ROWS = 8192;
/** Gaps a batch may carry before it is sent, full or not. */
const BATCH_GAPS = 4096;
const PIECE_BYTES = 64 * 1024;

/** Rows of several reader blocks, with the gaps that fell between them. */
interface Batch {
  block: SampleBlock;
  /** gaps[k] fell before row gapRows[k] of the batch. */
  gapRows: number[];
  gaps: Gap[];
}

type ToWorker =
  | { type: "begin"; info: LogInfo; settings: Partial<AnalysisSettings> }
  | { type: "batch"; batch: Batch }
  | { type: "finish"; summary: ReadSummary };

/** The ack hands the batch's buffers back, so the two threads pass a few buffer sets to and fro. */
type FromWorker =
  | { type: "ack"; block: SampleBlock }
  | { type: "done"; analysis: LogAnalysis }
  | { type: "failed"; message: string; badInput: boolean };

function buffersOf(b: SampleBlock): ArrayBuffer[] {
  return [
    b.timeS,
    ...b.gyro,
    ...(b.throttle ? [b.throttle] : []),
    ...b.rpm,
    ...(b.setpoint ?? []),
  ].map((a) => a.buffer as ArrayBuffer);
}

export interface TwoThreadOptions extends ReadOptions {
  settings?: Partial<AnalysisSettings>;
  /** URL of the entry module that calls runAnalysisThreadIfWorker() first thing. */
  entryUrl: URL | string;
}

/** Counters for tests and the bench: how many buffer sets were made and the most batches in flight. */
export interface PipelineStats {
  bufferSets: number;
  maxInFlight: number;
  batches: number;
}

export async function analyzeLogInTwoThreads(
  source: AsyncIterable<Uint8Array>,
  options: TwoThreadOptions,
): Promise<{ analysis: LogAnalysis; summary: ReadSummary; stats: PipelineStats }> {
  const stats: PipelineStats = { bufferSets: 0, maxInFlight: 0, batches: 0 };
  let inFlight = 0;
  let wake: (() => void) | null = null;
  // A holder, not a `let`: the worker's callbacks set it, and the checker cannot see that.
  const failed: { error: Error | null } = { error: null };
  // Failures are awaited below; until then the promise must not count as unhandled.
  const { promise: done, resolve: resolveDone, reject: rejectDone } = deferred<LogAnalysis>();
  const free: SampleBlock[] = [];
  // The worker starts when the reader has a header and a sample rate, so a file refused early
  // (not a CSV, no header, a bad cell in the first rows) costs no thread.
  const thread: { worker: Worker | null } = { worker: null };
  // The analysis thread allocates fast (a short-lived block result per order block), and V8 grows
  // its young generation to match, which cost some 25 MB of peak memory on a 77 MB log; capped at
  // 8 MB the peak fell from 158 to 135 MB with no loss of speed (measured with /usr/bin/time on
  // the bench's 300 s log, and the 1 GB log stayed at 141 MB).
  const ANALYSIS_HEAP = { maxYoungGenerationSizeMb: 8 };
  const startWorker = (): Worker => {
    const entry = new URL(options.entryUrl);
    // Under tsx the entry is TypeScript, and a worker does not inherit tsx's loader: register it
    // in the worker first, then load the entry.
    const w = entry.pathname.endsWith(".ts")
      ? new Worker(
          `import("tsx/esm/api").then((tsx) => { tsx.register(); return import(${JSON.stringify(entry.href)}); });`,
          { eval: true, workerData: { role: ROLE }, resourceLimits: ANALYSIS_HEAP },
        )
      : new Worker(entry, { workerData: { role: ROLE }, resourceLimits: ANALYSIS_HEAP });
    listen(w);
    return w;
  };
  const listen = (w: Worker) =>
    w
      .on("message", (m: FromWorker) => {
        if (m.type === "ack") {
          inFlight--;
          free.push(m.block);
          wake?.();
        } else if (m.type === "done") {
          resolveDone(m.analysis);
        } else {
          failed.error = m.badInput ? new LogFormatError(m.message) : new Error(m.message);
          rejectDone(failed.error);
          wake?.();
        }
      })
      .on("error", (e) => {
        failed.error = e;
        rejectDone(e);
        wake?.();
      });
  const post = (m: ToWorker, transfer: ArrayBuffer[] = []) => {
    thread.worker ??= startWorker();
    thread.worker.postMessage(m, transfer);
  };
  const settings = options.settings ?? {};

  let current: Batch | null = null;
  const newBatch = (like: SampleBlock): Batch => {
    let block = free.pop();
    if (!block) {
      const make = () => new Float64Array(BATCH_ROWS);
      block = {
        length: 0,
        timeS: make(),
        gyro: [make(), make(), make()],
        throttle: like.throttle ? make() : null,
        rpm: like.rpm.map(make),
        setpoint: like.setpoint ? [make(), make(), make()] : null,
      };
      stats.bufferSets++;
    }
    block.length = 0;
    return { block, gapRows: [], gaps: [] };
  };
  const send = () => {
    if (!current || (current.block.length === 0 && current.gaps.length === 0)) return;
    inFlight++;
    stats.batches++;
    stats.maxInFlight = Math.max(stats.maxInFlight, inFlight);
    post({ type: "batch", batch: current }, buffersOf(current.block));
    current = null;
  };
  let pendingGaps: Gap[] = [];
  const sink: LogSink = {
    begin: (info) => post({ type: "begin", info, settings }),
    // A gap always comes between two blocks: it is kept until the next block says which batch it joins.
    gap: (gap) => {
      pendingGaps.push(gap);
    },
    block: (b) => {
      let from = 0;
      while (from < b.length) {
        current ??= newBatch(b);
        const into = current.block;
        if (pendingGaps.length > 0) {
          for (const g of pendingGaps) {
            current.gapRows.push(into.length);
            current.gaps.push(g);
          }
          pendingGaps = [];
        }
        const n = Math.min(b.length - from, BATCH_ROWS - into.length);
        const at = into.length;
        into.timeS.set(b.timeS.subarray(from, from + n), at);
        b.gyro.forEach((g, a) => into.gyro[a]?.set(g.subarray(from, from + n), at));
        if (b.throttle) into.throttle?.set(b.throttle.subarray(from, from + n), at);
        b.rpm.forEach((r, m) => into.rpm[m]?.set(r.subarray(from, from + n), at));
        if (b.setpoint)
          b.setpoint.forEach((s, a) => into.setpoint?.[a]?.set(s.subarray(from, from + n), at));
        into.length += n;
        from += n;
        if (into.length === BATCH_ROWS || current.gaps.length >= BATCH_GAPS) send();
      }
    },
  };
  // The file in pieces; the next piece waits while the worker is behind.
  async function* paced(): AsyncGenerator<Uint8Array> {
    for await (const chunk of source) {
      for (let at = 0; at < chunk.length; at += PIECE_BYTES) {
        while (inFlight > MAX_IN_FLIGHT && !failed.error)
          await new Promise<void>((resolve) => (wake = resolve));
        if (failed.error) return;
        yield chunk.subarray(at, Math.min(chunk.length, at + PIECE_BYTES));
      }
    }
  }
  try {
    const summary = await readLog(paced(), sink, options);
    if (failed.error) throw failed.error;
    send();
    post({ type: "finish", summary });
    return { analysis: await done, summary, stats };
  } finally {
    await thread.worker?.terminate();
  }
}

/**
 * Call first thing in an entry module: in the analysis worker it serves the analyser and returns
 * true (the caller then does nothing else); in the main thread it returns false.
 */
export function runAnalysisThreadIfWorker(): boolean {
  if (isMainThread || (workerData as { role?: string } | null)?.role !== ROLE) return false;
  const port = parentPort;
  if (!port) return false;
  let analyzer: LogAnalyzer | null = null;
  port.on("message", (m: ToWorker) => {
    try {
      if (m.type === "begin") {
        analyzer = new LogAnalyzer(m.settings);
        analyzer.begin(m.info);
      } else if (m.type === "batch") {
        if (analyzer) replay(analyzer, m.batch);
        port.postMessage(
          { type: "ack", block: m.batch.block } satisfies FromWorker,
          buffersOf(m.batch.block),
        );
      } else if (analyzer) {
        port.postMessage({
          type: "done",
          analysis: analyzer.finish(m.summary),
        } satisfies FromWorker);
      }
    } catch (e) {
      port.postMessage({
        type: "failed",
        message: e instanceof Error ? e.message : String(e),
        badInput: e instanceof LogFormatError,
      } satisfies FromWorker);
    }
  });
  return true;
}

/** Hands a batch to the analyser as the reader handed it on: the runs between gaps, and the gaps. */
function replay(analyzer: LogAnalyzer, batch: Batch): void {
  const b = batch.block;
  const run = (from: number, to: number) => {
    if (to <= from) return;
    const view = (a: Float64Array) => a.subarray(from, to);
    analyzer.block({
      length: to - from,
      timeS: view(b.timeS),
      gyro: [view(b.gyro[0]), view(b.gyro[1]), view(b.gyro[2])],
      throttle: b.throttle ? view(b.throttle) : null,
      rpm: b.rpm.map(view),
      setpoint: b.setpoint ? [view(b.setpoint[0]), view(b.setpoint[1]), view(b.setpoint[2])] : null,
    });
  };
  let from = 0;
  batch.gaps.forEach((gap, k) => {
    const at = batch.gapRows[k] ?? from;
    run(from, at);
    analyzer.gap(gap);
    from = at;
  });
  run(from, b.length);
}
