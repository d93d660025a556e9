import { airframeRecord } from "@/lib/server/airframe-record";
import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";

export const dynamic = "force-dynamic";

/** GET /api/v1/airframes/:name — the airframe's record: state, parts by position, crashes, inspections, logs with verdicts, baseline. */
export async function GET(request: Request, { params }: { params: Promise<{ name: string }> }) {
  return jsonRoute("GET /api/v1/airframes/:name", async () => {
    const actor = await requireApiCaller(request, "viewer");
    // Next has already decoded the path segment once; decoding again would read "%25" as "%" and fail.
    return airframeRecord(actor, (await params).name);
  });
}
