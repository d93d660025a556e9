import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";
import { inspectionQueue } from "@/lib/server/queue";

export const dynamic = "force-dynamic";

/** GET /api/v1/queue: the ranked inspection list, [{ airframe, status, score, reasons }]. */
export async function GET(request: Request) {
  return jsonRoute("GET /api/v1/queue", async () => {
    const actor = await requireApiCaller(request, "viewer");
    const { entries } = await inspectionQueue(actor);
    return entries.map((e) => ({
      airframe: e.name,
      status: e.status,
      score: e.score,
      reasons: e.reasons,
      inNextHeat: e.inNextHeat,
    }));
  });
}
