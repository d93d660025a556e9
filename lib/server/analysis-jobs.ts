import "server-only";
import type { AnalysisOutcome } from "@/lib/analysis/worker";
import { compareWithPositions } from "@/lib/health/compare";
import { analysisPool } from "./analysis-pool";
import { storeAssessment } from "./assessments";
import { storedFileOf } from "./data-folder";
import { db } from "./db";
import { outdatedAnalyses, rebuildOutdatedBaselines } from "./engine-update";
import { maxUploadBytes } from "./limits";
import { isDiskFull } from "./storage-errors";
import { decodeAnalysis, decodeBaseline } from "./stored";

/**
 * Runs the analysis of stored logs off the request thread and records the verdict: the Analysis
 * row, the log's rate and length, and an Assessment against the airframe's active baseline, in one
 * transaction. Progress is kept in memory for the upload screen.
 */

// Kept on globalThis: route handlers and server actions may load their own copy of this module,
// and the upload screen's progress must come from the one running the job.
const state = globalThis as unknown as {
  heatcheckJobs?: {
    progress: Map<string, number>;
    running: Map<string, Promise<void>>;
    notes?: Map<string, string>;
  };
};
state.heatcheckJobs ??= { progress: new Map(), running: new Map(), notes: new Map() };
state.heatcheckJobs.notes ??= new Map();
const { progress, running, notes } = state.heatcheckJobs;

export function analysisProgress(logId: string): number | undefined {
  return progress.get(logId);
}

/** Why a pending job is waiting, when it is (its result could not be stored yet). */
export function analysisNote(logId: string): string | undefined {
  return notes.get(logId);
}

/** Queues a log's analysis; the promise settles when its verdict is stored. */
export function enqueueAnalysis(logId: string): Promise<void> {
  const already = running.get(logId);
  if (already) return already;
  progress.set(logId, 0);
  const job = run(logId)
    .catch(async (e: unknown) => {
      console.error(`the analysis of log ${logId} could not be completed`, e);
      // Never leave a log "pending" for ever: say it failed, so it can be re-run.
      await db.flightLog
        .update({
          where: { id: logId },
          data: {
            status: "failed",
            error: "the analysis could not be completed on the server; re-run it",
          },
        })
        .catch(() => undefined);
    })
    .finally(() => {
      running.delete(logId);
      progress.delete(logId);
      notes.delete(logId);
    });
  running.set(logId, job);
  return job;
}

/** Settles when every queued analysis has finished (for the seed and the tests). */
export async function analysesSettled(): Promise<void> {
  while (running.size > 0) await Promise.all([...running.values()]);
}

async function run(logId: string): Promise<void> {
  const log = await db.flightLog.findUnique({ where: { id: logId } });
  if (!log) return;
  const baseline = log.airframeId
    ? await db.baseline.findFirst(activeBaselineFilter(log.airframeId))
    : null;
  const result = await analysisPool.run(
    {
      jobId: logId,
      path: storedFileOf(log.storedPath),
      mapText: log.mapText,
      maxBytes: maxUploadBytes(),
      ...(baseline ? { baseline: { id: baseline.id, json: baseline.json } } : {}),
    },
    (f) => progress.set(logId, f),
  );
  if (!result.ok) {
    const error = result.badInput
      ? result.message
      : `analysis failed: ${result.message ?? "unknown error"}`;
    await withRetries(logId, () =>
      db.flightLog.update({ where: { id: logId }, data: { status: "failed", error } }),
    );
    if (!result.badInput) console.error(`analysis of log ${logId} failed`, result.message);
    return;
  }
  await withRetries(logId, () => storeResult(logId, log.airframeId, result));
}

/** Finds the airframe's active baseline (the newest, should there be two). */
function activeBaselineFilter(airframeId: string) {
  return { where: { airframeId, active: true }, orderBy: { createdAt: "desc" as const } };
}

/** Waits before each new try of a result write that failed (a full disk, a busy database). */
const RETRY_DELAYS_MS = [500, 2_000, 5_000, 15_000, 30_000];

/**
 * Writes a job's outcome, trying again a few times over about a minute when the write fails (a
 * full disk may be freed). When it still fails, the error goes to the catch in enqueueAnalysis,
 * which marks the log failed if that write can be done; otherwise the log stays pending and is
 * re-run at the next start. Meanwhile the status API says why the job waits.
 */
async function withRetries(logId: string, write: () => Promise<unknown>): Promise<void> {
  for (let attempt = 0; ; attempt++) {
    try {
      await write();
      notes.delete(logId);
      return;
    } catch (e) {
      const delay = RETRY_DELAYS_MS[attempt];
      if (delay === undefined) throw e;
      notes.set(
        logId,
        isDiskFull(e)
          ? "the server's disk is full: the result waits to be stored"
          : "the result could not be stored yet: trying again",
      );
      console.error(
        `storing the analysis of log ${logId} failed (try ${attempt + 1}); trying again in ${delay} ms`,
        e,
      );
      await new Promise((r) => setTimeout(r, delay));
    }
  }
}

async function storeResult(
  logId: string,
  airframeId: string | null,
  outcome: AnalysisOutcome,
): Promise<void> {
  const { analysisJson } = outcome;
  await db.$transaction(async (tx) => {
    await tx.analysis.upsert({
      where: { logId },
      create: { logId, json: analysisJson },
      update: { json: analysisJson },
    });
    await tx.flightLog.update({
      where: { id: logId },
      data: {
        status: "analysed",
        error: null,
        sampleRateHz: outcome.sampleRateHz,
        durationS: outcome.durationS,
      },
    });
    if (!airframeId) return;
    // After an engine update, the baselines this log is part of may now be built again.
    const rebuilt = await rebuildOutdatedBaselines(tx, logId);
    // The id alone: the stored JSON is large and needed only when the worker compared with another.
    const active = await tx.baseline.findFirst({
      ...activeBaselineFilter(airframeId),
      select: { id: true },
    });
    if (!active) return;
    if (outcome.compared?.baselineId === active.id && !rebuilt.includes(active.id)) {
      await storeAssessment(tx, logId, outcome.compared.assessment, active.id);
      return;
    }
    // The worker compared with the baseline that was active when the job started (or with none);
    // another has been set meanwhile, or this one was built again, so the comparison is made here.
    const baseline = await tx.baseline.findFirst(activeBaselineFilter(airframeId));
    if (!baseline) return;
    const compared = compareWithPositions(
      decodeAnalysis(analysisJson),
      decodeBaseline(baseline.json),
    );
    await storeAssessment(tx, logId, compared, baseline.id);
  });
}

/**
 * Queues again, one after another, the analysed logs whose analysis an earlier engine made
 * (called once when the server starts; see engine-update.ts). Their status stays "analysed",
 * with the old verdict shown, until the new one is stored.
 */
export async function reanalyseOutdated(): Promise<{ queued: number; done: Promise<void> }> {
  const ids = await outdatedAnalyses();
  const done = (async () => {
    for (const id of ids) await enqueueAnalysis(id);
  })();
  return { queued: ids.length, done };
}

/** Re-queues logs left pending by a stop (called once when the server starts). */
export async function resumePendingAnalyses(): Promise<number> {
  const pending = await db.flightLog.findMany({
    where: { status: "pending" },
    select: { id: true },
  });
  for (const p of pending) void enqueueAnalysis(p.id);
  return pending.length;
}
