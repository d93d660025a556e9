import { NotFoundError } from "@/lib/errors";
import { analysisNote, analysisProgress } from "@/lib/server/analysis-jobs";
import { db } from "@/lib/server/db";
import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";

export const dynamic = "force-dynamic";

/** GET /api/v1/logs/:id — status of an uploaded log: pending (with progress 0..1), analysed with its verdict, or failed with the reason. */
export async function GET(request: Request, { params }: { params: Promise<{ id: string }> }) {
  return jsonRoute("GET /api/v1/logs/:id", async () => {
    const actor = await requireApiCaller(request, "viewer");
    const { id } = await params;
    const log = await db.flightLog.findFirst({
      where: { id, teamId: actor.teamId },
      include: {
        airframe: { select: { name: true } },
        assessments: { orderBy: { createdAt: "desc" }, take: 1 },
      },
    });
    if (!log) throw new NotFoundError("That log");
    const a = log.assessments[0];
    return {
      id: log.id,
      fileName: log.fileName,
      airframe: log.airframe?.name ?? null,
      status: log.status,
      progress: log.status === "pending" ? (analysisProgress(log.id) ?? 0) : 1,
      error: log.error,
      /** Why a pending analysis waits, when it does (e.g. its result cannot be stored yet). */
      note: log.status === "pending" ? (analysisNote(log.id) ?? null) : null,
      sampleRateHz: log.sampleRateHz,
      durationS: log.durationS,
      verdict: a ? { score: a.score, status: a.status } : null,
    };
  });
}
