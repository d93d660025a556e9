import "server-only";
import { existsSync } from "node:fs";
import { availableParallelism } from "node:os";
import { join } from "node:path";
import { Worker } from "node:worker_threads";
import {
  runJob,
  type AnalysisJob,
  type AnalysisOutcome,
  type WorkerMessage,
} from "@/lib/analysis/worker";

/**
 * A pool of worker threads for log analysis, sized to the machine (one thread per core but one,
 * at least one; HEATCHECK_WORKERS overrides). HEATCHECK_WORKERS=0 runs jobs on the main thread,
 * for tests and single-core boxes. Jobs queue in memory; the database keeps them "pending", so a
 * restart picks them up again (see analysis-jobs.ts).
 */

export type JobResult =
  ({ ok: true } & AnalysisOutcome) | { ok: false; message: string; badInput: boolean };

interface Pending {
  job: AnalysisJob;
  resolve: (r: JobResult) => void;
  onProgress: (fraction: number) => void;
}

export const WORKER_BUNDLE = join(process.cwd(), "generated", "worker", "analysis-worker.mjs");

class AnalysisPool {
  private readonly size: number;
  private readonly idle: Worker[] = [];
  private readonly busy = new Map<Worker, Pending>();
  private readonly queue: Pending[] = [];
  private started = 0;

  constructor(size: number) {
    this.size = size;
  }

  run(job: AnalysisJob, onProgress: (fraction: number) => void): Promise<JobResult> {
    return new Promise((resolve) => {
      this.queue.push({ job, resolve, onProgress });
      this.pump();
    });
  }

  get queued(): number {
    return this.queue.length + this.busy.size;
  }

  private pump(): void {
    if (this.size === 0) {
      const next = this.queue.shift();
      if (next) void this.inline(next);
      return;
    }
    while (this.queue.length > 0) {
      const worker = this.idle.pop() ?? (this.started < this.size ? this.spawn() : undefined);
      if (!worker) return;
      const next = this.queue.shift() as Pending;
      this.busy.set(worker, next);
      worker.postMessage(next.job);
    }
  }

  private async inline(p: Pending): Promise<void> {
    await runJob(p.job, (m) => this.settle(p, m));
    this.pump();
  }

  private settle(p: Pending, m: WorkerMessage): boolean {
    if (m.type === "progress") {
      p.onProgress(m.fraction);
      return false;
    }
    if (m.type === "done") {
      const { type: _type, jobId: _jobId, ...outcome } = m;
      p.resolve({ ok: true, ...outcome });
    } else {
      p.resolve({ ok: false, message: m.message, badInput: m.badInput });
    }
    return true;
  }

  private spawn(): Worker {
    if (!existsSync(WORKER_BUNDLE)) {
      throw new Error(`the analysis worker is not built (${WORKER_BUNDLE}); run npm run build`);
    }
    this.started++;
    const worker = new Worker(WORKER_BUNDLE);
    worker.on("message", (m: WorkerMessage) => {
      const p = this.busy.get(worker);
      if (!p || !this.settle(p, m)) return;
      this.busy.delete(worker);
      this.idle.push(worker);
      this.pump();
    });
    worker.on("error", (err) => {
      // A crashed worker fails its job with a plain message and is replaced on the next job.
      const p = this.busy.get(worker);
      this.busy.delete(worker);
      this.started--;
      console.error("analysis worker crashed", err);
      p?.resolve({
        ok: false,
        message: "the analysis stopped unexpectedly; try re-running it",
        badInput: false,
      });
      this.pump();
    });
    return worker;
  }
}

/** Worker threads for analysis (HEATCHECK_WORKERS, default cores − 1); 0 means inline. */
export function poolSize(): number {
  const configured = process.env.HEATCHECK_WORKERS;
  if (configured !== undefined && /^\d+$/.test(configured)) return Number(configured);
  return Math.max(1, availableParallelism() - 1);
}

const globalForPool = globalThis as unknown as { heatcheckPool?: AnalysisPool };
export const analysisPool: AnalysisPool =
  globalForPool.heatcheckPool ?? new AnalysisPool(poolSize());
globalForPool.heatcheckPool = analysisPool;
