import { NextResponse } from "next/server";
import { airframeHistory, historyCsv } from "@/lib/server/airframe-history";
import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";

export const dynamic = "force-dynamic";

/**
 * GET /api/v1/airframes/:name/history?format=json|csv — the airframe's whole history (parts fitted
 * and removed, crashes, inspections, baselines, logs with scores and findings) as a download.
 */
export async function GET(request: Request, { params }: { params: Promise<{ name: string }> }) {
  const format = new URL(request.url).searchParams.get("format") === "csv" ? "csv" : "json";
  let csv = "";
  let fileName = "";
  const json = await jsonRoute("GET /api/v1/airframes/:name/history", async () => {
    const actor = await requireApiCaller(request, "viewer");
    const history = await airframeHistory(actor, (await params).name);
    fileName = `${history.airframe.name.replace(/[^A-Za-z0-9._-]+/g, "_")}-history.${format}`;
    if (format === "csv") csv = historyCsv(history);
    return history;
  });
  const headers = {
    "content-disposition": `attachment; filename="${fileName}"`,
    "cache-control": "no-store",
  };
  if (json.status !== 200) return json;
  if (format === "csv")
    return new NextResponse(csv, {
      headers: { ...headers, "content-type": "text/csv; charset=utf-8" },
    });
  json.headers.set("content-disposition", headers["content-disposition"]);
  json.headers.set("cache-control", "no-store");
  return json;
}
