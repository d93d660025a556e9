import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { LogFormatError } from "../errors";
import type { Gap, LogInfo, LogSink, ReadOptions, ReadSummary, SampleBlock } from "../logs/read-log";
import { readLog } from "../logs/read-log";
import { LogAnalyzer } from "./analyzer";
import type { AnalysisSettings } from "./settings";
import type { LogAnalysis } from "./types";

/**
 * The analysis split over two threads: this thread reads and parses the CSV, a worker thread runs
 * the analyser on the blocks it is sent. On a 2-core pit laptop parsing and spectra then overlap.
 * At most MAX_IN_FLIGHT blocks wait in the worker, so memory stays bounded however long the log.
 *
 * The worker is the calling program's own entry module started again with a marker in workerData
 * (see {@link runAnalysisThreadIfWorker}), so the same file serves as TypeScript under tsx and as
 * one bundled .mjs.
 */

const ROLE = "heatcheck-analysis-thread";
const MAX_IN_FLIGHT = 4;

type ToWorker =
  | { type: "begin"; info: LogInfo; settings: Partial<AnalysisSettings> }
  | { type: "block"; block: SampleBlock }
  | { type: "gap"; gap: Gap }
  | { type: "finish"; summary: ReadSummary };

/** The ack hands the block's buffers back, so the two threads pass a few buffer sets to and fro. */
type FromWorker = { type: "ack"; block: SampleBlock } | { type: "done"; analysis: LogAnalysis } | { type: "failed"; message: string; badInput: boolean };

function buffersOf(b: SampleBlock): ArrayBuffer[] {
  return [b.timeS, ...b.gyro, ...(b.throttle ? [b.throttle] : []), ...b.rpm].map((a) => a.buffer as ArrayBuffer);
}

export interface TwoThreadOptions extends ReadOptions {
  settings?: Partial<AnalysisSettings>;
  /** URL of the entry module that calls runAnalysisThreadIfWorker() first thing. */
  entryUrl: URL | string;
}

export async function analyzeLogInTwoThreads(source: AsyncIterable<Uint8Array>, options: TwoThreadOptions): Promise<{ analysis: LogAnalysis; summary: ReadSummary }> {
  const entry = new URL(options.entryUrl);
  // Under tsx the entry is TypeScript, and a worker does not inherit tsx's loader: register it
  // in the worker first, then load the entry.
  const worker = entry.pathname.endsWith(".ts")
    ? new Worker(`import("tsx/esm/api").then((tsx) => { tsx.register(); return import(${JSON.stringify(entry.href)}); });`, { eval: true, workerData: { role: ROLE } })
    : new Worker(entry, { workerData: { role: ROLE } });
  let inFlight = 0;
  let wake: (() => void) | null = null;
  let failure: Error | null = null;
  let resolveDone: (a: LogAnalysis) => void = () => undefined;
  let rejectDone: (e: Error) => void = () => undefined;
  const done = new Promise<LogAnalysis>((resolve, reject) => {
    resolveDone = resolve;
    rejectDone = reject;
  });
  // Failures are awaited below; until then the promise must not count as unhandled.
  done.catch(() => undefined);
  worker.on("message", (m: FromWorker) => {
    if (m.type === "ack") {
      inFlight--;
      free.push(m.block);
      wake?.();
    } else if (m.type === "done") {
      resolveDone(m.analysis);
    } else {
      failure = m.badInput ? new LogFormatError(m.message) : new Error(m.message);
      rejectDone(failure);
      wake?.();
    }
  });
  worker.on("error", (e) => {
    failure = e;
    rejectDone(e);
    wake?.();
  });
  const post = (m: ToWorker, transfer: ArrayBuffer[] = []) => worker.postMessage(m, transfer);
  const free: SampleBlock[] = [];
  const settings = options.settings ?? {};
  const sink: LogSink = {
    begin: (info) => post({ type: "begin", info, settings }),
    gap: (gap) => post({ type: "gap", gap }),
    block: (b) => {
      // The reader reuses its arrays: copy them into a buffer set of our own and hand its memory
      // over (no cloning); the worker hands it back with the ack.
      const make = () => new Float64Array(b.timeS.length);
      const block: SampleBlock = free.pop() ?? {
        length: 0,
        timeS: make(),
        gyro: [make(), make(), make()],
        throttle: b.throttle ? make() : null,
        rpm: b.rpm.map(make),
        setpoint: null,
      };
      const n = b.length;
      block.length = n;
      block.timeS.set(b.timeS.subarray(0, n));
      b.gyro.forEach((g, a) => block.gyro[a]?.set(g.subarray(0, n)));
      if (b.throttle) block.throttle?.set(b.throttle.subarray(0, n));
      b.rpm.forEach((r, m) => block.rpm[m]?.set(r.subarray(0, n)));
      inFlight++;
      post({ type: "block", block }, buffersOf(block));
    },
  };
  // Hold the next chunk back while the worker is behind.
  async function* paced(): AsyncGenerator<Uint8Array> {
    for await (const chunk of source) {
      while (inFlight > MAX_IN_FLIGHT && !failure) await new Promise<void>((resolve) => (wake = resolve));
      if (failure) return;
      yield chunk;
    }
  }
  try {
    const summary = await readLog(paced(), sink, options);
    if (failure) throw failure;
    post({ type: "finish", summary });
    return { analysis: await done, summary };
  } finally {
    await worker.terminate();
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
      } else if (m.type === "block") {
        analyzer?.block(m.block);
        port.postMessage({ type: "ack", block: m.block } satisfies FromWorker, buffersOf(m.block));
      } else if (m.type === "gap") {
        analyzer?.gap(m.gap);
      } else if (analyzer) {
        port.postMessage({ type: "done", analysis: analyzer.finish(m.summary) } satisfies FromWorker);
      }
    } catch (e) {
      port.postMessage({ type: "failed", message: e instanceof Error ? e.message : String(e), badInput: e instanceof LogFormatError } satisfies FromWorker);
    }
  });
  return true;
}
