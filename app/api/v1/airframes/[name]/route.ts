import { airframeByName } from "@/lib/server/airframes";
import { activeBaseline } from "@/lib/server/baselines";
import { db } from "@/lib/server/db";
import { requireApiCaller } from "@/lib/server/guard";
import { decodeCrashPositions } from "@/lib/server/stored";
import { jsonRoute } from "@/lib/server/http";
import { installedParts } from "@/lib/server/parts";

export const dynamic = "force-dynamic";

/** GET /api/v1/airframes/:name — the airframe's record: state, parts by position, crashes, inspections, logs with verdicts, baseline. */
export async function GET(request: Request, { params }: { params: Promise<{ name: string }> }) {
  return jsonRoute("GET /api/v1/airframes/:name", async () => {
    const actor = await requireApiCaller(request, "viewer");
    // Next has already decoded the path segment once; decoding again would read "%25" as "%" and fail.
    const airframe = await airframeByName(actor, (await params).name);
    const [parts, crashes, inspections, logs, baseline] = await Promise.all([
      installedParts(actor, airframe.id),
      db.crash.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
      db.inspection.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
      db.flightLog.findMany({
        where: { airframeId: airframe.id },
        orderBy: { flownAt: "desc" },
        include: { assessments: { orderBy: { createdAt: "desc" }, take: 1 } },
      }),
      activeBaseline(airframe.id),
    ]);
    return {
      name: airframe.name,
      frameDesign: airframe.frameDesign,
      serial: airframe.serial,
      state: airframe.state,
      retired: airframe.retired,
      parts: parts.map((p) => ({
        position: p.position,
        kind: p.part.kind,
        model: p.part.model,
        label: p.part.label,
        since: p.fromAt,
        flights: p.life.flights,
        minutes: Math.round(p.life.minutes * 10) / 10,
        lifeUsed: p.life.fraction,
      })),
      crashes: crashes.map((c) => ({
        at: c.at,
        severity: c.severity,
        positions: decodeCrashPositions(c.positions),
        note: c.note,
      })),
      inspections: inspections.map((i) => ({
        at: i.at,
        signedOffBy: i.signedOffName,
        findings: i.findings,
        returnedToService: i.returnedToService,
      })),
      baseline: baseline
        ? {
            setAt: baseline.createdAt,
            setBy: baseline.setByName,
            reason: baseline.reason,
            logs: baseline.logIds.length,
          }
        : null,
      logs: logs.map((l) => ({
        id: l.id,
        fileName: l.fileName,
        flownAt: l.flownAt,
        status: l.status,
        error: l.error,
        score: l.assessments[0]?.score ?? null,
        verdict: l.assessments[0]?.status ?? null,
      })),
    };
  });
}
