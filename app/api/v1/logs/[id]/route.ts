import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";
import { logStatus } from "@/lib/server/log-status";

export const dynamic = "force-dynamic";

/** GET /api/v1/logs/:id — status of an uploaded log: pending (with progress 0..1), analysed with its verdict, or failed with the reason. */
export async function GET(request: Request, { params }: { params: Promise<{ id: string }> }) {
  return jsonRoute("GET /api/v1/logs/:id", async () => {
    const actor = await requireApiCaller(request, "viewer");
    return logStatus(actor, (await params).id);
  });
}
