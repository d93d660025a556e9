import { requireApiCaller } from "@/lib/server/guard";
import { jsonRoute } from "@/lib/server/http";
import { ingestLog } from "@/lib/server/ingest";
import { drainUnread, readMultipartFile, REFUSED_BODY_DRAIN_BYTES } from "@/lib/server/multipart";

export const dynamic = "force-dynamic";

/**
 * POST /api/v1/logs — multipart: `file`, optional `airframe` (name) or `airframeId`, optional
 * `mapText` (column map). Fields must come before the file. Bearer token or signed-in pilot+.
 * Answers at once with { logId, airframe, duplicate, matchedBy }; the analysis runs in the background.
 */
export async function POST(request: Request) {
  const response = await jsonRoute("POST /api/v1/logs", async () => {
    const actor = await requireApiCaller(request, "pilot");
    return readMultipartFile(request, (file) =>
      ingestLog(actor, {
        fileName: file.fileName,
        body: file.body,
        airframeName: file.fields.airframe || undefined,
        airframeId: file.fields.airframeId || undefined,
        mapText: file.fields.mapText || undefined,
      }),
    );
  });
  // A refused upload may have been answered before its whole body was read (the guard refuses
  // before the body is touched). Read a bounded rest of it first, so a client still sending a
  // small file gets this answer rather than a broken pipe; then close the connection rather than
  // let a client reuse a socket whose request the server did not finish reading.
  if (response.status >= 400) {
    await drainUnread(request, REFUSED_BODY_DRAIN_BYTES);
    response.headers.set("Connection", "close");
  }
  // proxy.ts skips this route (so the body streams uncut), so the API's no-store is set here.
  response.headers.set("Cache-Control", "no-store");
  return response;
}
