import "server-only";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { Worker } from "node:worker_threads";
import { checkUpload, type UploadCheckOptions } from "@/lib/analysis/upload-check";
import type { FromChecker, ToChecker } from "@/lib/analysis/upload-check-protocol";
import { deferred, type Deferred } from "@/lib/deferred";
import { LimitExceededError, LogFormatError } from "@/lib/errors";
import type { ReadSummary } from "@/lib/logs/types";
import { poolSize } from "./analysis-pool";

/**
 * Runs the upload check (the log reader over the bytes as they stream in) in one worker thread
 * that all uploads share, so that the event loop that answers pages and the queue only hashes and
 * writes. With HEATCHECK_WORKERS=0 the check runs inline on the request thread.
 */

export const CHECK_WORKER_BUNDLE = join(
  process.cwd(),
  "generated",
  "worker",
  "upload-check-worker.mjs",
);

/** Chunks an upload may have in the worker's hands before the next one waits. */
const MAX_IN_FLIGHT = 4;

/** Checks one upload: `check(bytes)` reads the stream through and resolves with the summary. */
export function checkUploadStream(
  bytes: AsyncIterable<Uint8Array>,
  options: UploadCheckOptions,
): Promise<ReadSummary> {
  return poolSize() === 0 ? checkUpload(bytes, options) : checker().check(bytes, options);
}

interface OpenCheck {
  inFlight: number;
  wake: (() => void) | null;
  failure: Error | null;
  /** Awaited once every chunk is sent; a refusal may arrive before that. */
  result: Deferred<ReadSummary>;
}

/** Ends one check with a refusal: the sender stops at its next chunk. */
function fail(c: OpenCheck, error: Error): void {
  c.failure = error;
  c.result.reject(error);
  c.wake?.();
}

class UploadChecker {
  private worker: Worker | null = null;
  private nextId = 1;
  private readonly open = new Map<number, OpenCheck>();

  async check(bytes: AsyncIterable<Uint8Array>, options: UploadCheckOptions): Promise<ReadSummary> {
    const worker = this.thread();
    const id = this.nextId++;
    const state: OpenCheck = { inFlight: 0, wake: null, failure: null, result: deferred() };
    this.open.set(id, state);
    const post = (m: ToChecker, transfer: ArrayBuffer[] = []) => worker.postMessage(m, transfer);
    post({ type: "start", id, options });
    try {
      for await (const chunk of bytes) {
        while (state.inFlight >= MAX_IN_FLIGHT && !state.failure)
          await new Promise<void>((r) => (state.wake = r));
        if (state.failure) break;
        // A copy of just these bytes (a Buffer may be a view of a larger pool), moved, not cloned.
        const copy = new Uint8Array(chunk);
        state.inFlight++;
        post({ type: "chunk", id, bytes: copy }, [copy.buffer]);
      }
      if (!state.failure) post({ type: "end", id });
    } catch (e) {
      // The stream itself failed (size limit, full disk, a cut-off request): stop the reader.
      post({ type: "abort", id });
      this.open.delete(id);
      throw e;
    }
    try {
      return await state.result.promise;
    } finally {
      this.open.delete(id);
    }
  }

  private thread(): Worker {
    if (this.worker) return this.worker;
    if (!existsSync(CHECK_WORKER_BUNDLE)) {
      throw new Error(
        `the upload-check worker is not built (${CHECK_WORKER_BUNDLE}); run npm run build`,
      );
    }
    const worker = new Worker(CHECK_WORKER_BUNDLE);
    worker.unref();
    worker.on("message", (m: FromChecker) => {
      const c = this.open.get(m.id);
      if (!c) return;
      if (m.type === "ack") {
        c.inFlight--;
        c.wake?.();
      } else if (m.type === "passed") {
        c.result.resolve(m.summary);
      } else {
        fail(
          c,
          m.kind === "format"
            ? new LogFormatError(m.message)
            : m.kind === "limit"
              ? new LimitExceededError(m.message)
              : new Error(m.message),
        );
      }
    });
    // A thread that crashes or exits fails the uploads it was checking (an exit without an error
    // would otherwise leave them waiting for ever); the next upload starts a new thread.
    const lost = (why: unknown) => {
      if (this.worker !== worker) return;
      console.error("the upload-check worker stopped", why);
      this.worker = null;
      for (const c of this.open.values())
        fail(c, new Error("the upload check stopped unexpectedly; try the upload again"));
    };
    worker.on("error", lost);
    worker.on("exit", (code) => lost(`exit code ${code}`));
    this.worker = worker;
    return worker;
  }
}

const globalForChecker = globalThis as unknown as { heatcheckUploadChecker?: UploadChecker };
function checker(): UploadChecker {
  return (globalForChecker.heatcheckUploadChecker ??= new UploadChecker());
}
