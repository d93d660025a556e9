import "server-only";
import { NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { analysisNote, analysisProgress } from "./analysis-jobs";
import { db } from "./db";
import { decodeStatus } from "./stored";

/**
 * GET /api/v1/logs/:id — where an uploaded log stands: pending (with progress 0..1 and why it
 * waits, when it does), analysed with its latest verdict, or failed with the reason.
 */
export async function logStatus(actor: Actor, logId: string) {
  const log = await db.flightLog.findFirst({
    where: { id: logId, teamId: actor.teamId },
    include: {
      airframe: { select: { name: true } },
      assessments: { orderBy: { createdAt: "desc" }, take: 1 },
    },
  });
  if (!log) throw new NotFoundError("That log");
  const a = log.assessments[0];
  const pending = log.status === "pending";
  return {
    id: log.id,
    fileName: log.fileName,
    airframe: log.airframe?.name ?? null,
    status: log.status,
    progress: pending ? (analysisProgress(log.id) ?? 0) : 1,
    error: log.error,
    /** Why a pending analysis waits, when it does (e.g. its result cannot be stored yet). */
    note: pending ? (analysisNote(log.id) ?? null) : null,
    sampleRateHz: log.sampleRateHz,
    durationS: log.durationS,
    verdict: a ? { score: a.score, status: decodeStatus(a.status) } : null,
  };
}
