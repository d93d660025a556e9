import "server-only";
import { existsSync } from "node:fs";
import { ANALYSIS_VERSION, orderGeneration } from "@/lib/analysis/types";
import { buildBaseline, BASELINE_VERSION } from "@/lib/health/baseline";
import { rescoreLaterLogs } from "./baselines";
import { storedFileOf } from "./data-folder";
import { db, type Tx } from "./db";
import { decodeAnalysis, decodeBaseline } from "./stored";

/**
 * After an update of the engine, what an earlier version stored is derived again: an analysis is
 * derived from the stored original, a baseline from the analyses of the logs someone chose. Until
 * then a comparison may leave out what the two versions measure differently (motor orders before
 * analysis version 3: lib/analysis/types.ts), which would hide a bent prop; so the server does it
 * by itself, at start, instead of waiting for someone to analyse every log again by hand.
 */

/** The `"version":N` at the head of a stored analysis (the worker writes it first). */
const VERSION_AT_HEAD = /^\{"version":(\d+)/;
const HEAD_CHARS = 32;

/**
 * The analysed logs whose stored analysis an earlier engine made, logs of active baselines first
 * (so their baselines are current before the logs flown after them are compared again). Reads
 * only the head of each stored analysis: the JSON is large, and this runs at every start.
 */
export async function outdatedAnalyses(): Promise<string[]> {
  const rows = await db.$queryRaw<{ logId: string; head: string; storedPath: string }[]>`
    SELECT a."logId" AS "logId", substr(a."json", 1, ${HEAD_CHARS}) AS "head",
      l."storedPath" AS "storedPath"
    FROM "Analysis" a JOIN "FlightLog" l ON l."id" = a."logId"
    WHERE l."status" = 'analysed'`;
  const outdated = rows
    .filter((r) => Number(VERSION_AT_HEAD.exec(r.head)?.[1] ?? 0) < ANALYSIS_VERSION)
    // A log whose original is gone keeps the analysis it has rather than turn "failed".
    .filter((r) => existsSync(storedFileOf(r.storedPath)))
    .map((r) => r.logId);
  if (outdated.length === 0) return [];
  const inBaselines = new Set(
    (
      await db.baselineLog.findMany({
        where: { logId: { in: outdated }, baseline: { active: true } },
        select: { logId: true },
      })
    ).map((b) => b.logId),
  );
  return [
    ...outdated.filter((id) => inBaselines.has(id)),
    ...outdated.filter((id) => !inBaselines.has(id)),
  ];
}

/**
 * Within the transaction that stores log `logId`'s new analysis: every active baseline of that
 * log that an earlier engine built, once all of its logs carry current analyses, is built again
 * from the same logs (same id, same reason: nobody's choice changes) and the logs flown after it
 * that are already current are scored again against it. Returns the ids of the rebuilt baselines.
 */
export async function rebuildOutdatedBaselines(tx: Tx, logId: string): Promise<string[]> {
  const links = await tx.baselineLog.findMany({
    where: { logId, baseline: { active: true } },
    select: { baselineId: true },
  });
  const rebuilt: string[] = [];
  for (const { baselineId } of links) {
    // Whether it is outdated first: the analyses are read only for a baseline to be rebuilt.
    const head = await tx.baseline.findUnique({
      where: { id: baselineId },
      select: { json: true },
    });
    if (!head || !isOutdatedBaseline(head.json)) continue;
    const baseline = await tx.baseline.findUnique({
      where: { id: baselineId },
      include: { logs: { include: { log: { include: { analysis: true } } } } },
    });
    if (!baseline) continue;
    const analyses = baseline.logs.map((b) =>
      b.log.analysis ? decodeAnalysis(b.log.analysis.json) : null,
    );
    if (analyses.some((a) => !a || a.version !== ANALYSIS_VERSION)) continue;
    const fresh = buildBaseline(analyses.filter((a) => a !== null));
    await tx.baseline.update({ where: { id: baseline.id }, data: { json: JSON.stringify(fresh) } });
    await tx.auditEntry.create({
      data: {
        teamId: baseline.teamId,
        userId: null,
        userName: "heatcheck",
        action: "rebuild baseline",
        entity: "airframe",
        entityId: baseline.airframeId,
        detail:
          `the engine was updated: baseline set by ${baseline.setByName} (${baseline.reason}) built again from its ${baseline.logs.length} log(s)`.slice(
            0,
            500,
          ),
      },
    });
    const newest = baseline.logs.reduce(
      (t, b) => (b.log.flownAt > t ? b.log.flownAt : t),
      new Date(0),
    );
    // A log still waiting for its own new analysis is scored when that is stored.
    await rescoreLaterLogs(
      tx,
      baseline.airframeId,
      newest,
      fresh,
      baseline.id,
      (id, analysis) => id === logId || analysis.version !== ANALYSIS_VERSION,
    );
    rebuilt.push(baseline.id);
  }
  return rebuilt;
}

/** Built by an earlier engine, or from logs whose motor orders were measured another way. */
function isOutdatedBaseline(json: string): boolean {
  const b = decodeBaseline(json);
  return (
    b.version < BASELINE_VERSION || (b.orderGeneration ?? 1) !== orderGeneration(ANALYSIS_VERSION)
  );
}
