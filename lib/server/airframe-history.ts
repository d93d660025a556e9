import "server-only";
import type { Actor } from "@/lib/roles";
import { airframeByName } from "./airframes";
import { csvField } from "./csv";
import { db } from "./db";
import { decodeCrashPositions, decodeFindings, decodeStatus } from "./stored";

/** A crash as the history export and the airframe API show it. */
export function crashRecord(c: { at: Date; severity: string; positions: string; note: string }) {
  return {
    at: c.at,
    severity: c.severity,
    positions: decodeCrashPositions(c.positions),
    note: c.note,
  };
}

/** An inspection as the history export and the airframe API show it. */
export function inspectionRecord(i: {
  at: Date;
  signedOffName: string;
  findings: string;
  returnedToService: boolean;
}) {
  return {
    at: i.at,
    signedOffBy: i.signedOffName,
    findings: i.findings,
    returnedToService: i.returnedToService,
  };
}

/** A log with its latest verdict (the newest assessment first in `assessments`). */
export function logRecord(l: {
  id: string;
  fileName: string;
  flownAt: Date;
  status: string;
  error: string | null;
  assessments: { score: number | null; status: string }[];
}) {
  const a = l.assessments[0];
  return {
    id: l.id,
    fileName: l.fileName,
    flownAt: l.flownAt,
    status: l.status,
    error: l.error,
    score: a?.score ?? null,
    verdict: a ? decodeStatus(a.status) : null,
  };
}

/**
 * An airframe's whole history for export: every crash, part fitted or removed, inspection,
 * baseline and log with its score and findings — what a technician takes to a spreadsheet when
 * choosing spares, or to another team's server. Times are ISO 8601 UTC.
 */
export async function airframeHistory(actor: Actor, name: string) {
  const airframe = await airframeByName(actor, name);
  const where = { airframeId: airframe.id, teamId: actor.teamId };
  const [installations, crashes, inspections, baselines, logs] = await Promise.all([
    db.installation.findMany({ where, include: { part: true }, orderBy: { fromAt: "asc" } }),
    db.crash.findMany({ where, orderBy: { at: "asc" } }),
    db.inspection.findMany({ where, orderBy: { at: "asc" } }),
    db.baseline.findMany({ where, include: { logs: true }, orderBy: { createdAt: "asc" } }),
    db.flightLog.findMany({
      where,
      orderBy: { flownAt: "asc" },
      include: { assessments: { orderBy: { createdAt: "desc" } } },
    }),
  ]);
  return {
    airframe: {
      name: airframe.name,
      frameDesign: airframe.frameDesign,
      serial: airframe.serial,
      state: airframe.state,
      retired: airframe.retired,
      notes: airframe.notes,
    },
    installations: installations.map((i) => ({
      position: i.position,
      kind: i.part.kind,
      model: i.part.model,
      label: i.part.label,
      fittedAt: i.fromAt,
      removedAt: i.toAt,
      reason: i.reason,
    })),
    crashes: crashes.map(crashRecord),
    inspections: inspections.map(inspectionRecord),
    baselines: baselines.map((b) => ({
      setAt: b.createdAt,
      setBy: b.setByName,
      reason: b.reason,
      active: b.active,
      logs: b.logs.map((l) => l.logId),
    })),
    logs: logs.map((l) => {
      const a = l.assessments[0];
      return {
        ...logRecord(l),
        sampleRateHz: l.sampleRateHz,
        durationS: l.durationS,
        findings: a ? decodeFindings(a.findings).map((f) => f.text) : [],
      };
    }),
  };
}

type History = Awaited<ReturnType<typeof airframeHistory>>;

/** The history as one CSV table, one row per event in time order. */
export function historyCsv(h: History): string {
  const rows: {
    at: Date;
    kind: string;
    position: string;
    part: string;
    score: number | null;
    verdict: string;
    detail: string;
  }[] = [
    ...h.installations.flatMap((i) => {
      const part = `${i.kind} ${i.model} ${i.label}`;
      const fitted = {
        at: i.fittedAt,
        kind: "fitted",
        position: i.position,
        part,
        score: null,
        verdict: "",
        detail: i.reason,
      };
      return i.removedAt
        ? [
            fitted,
            {
              at: i.removedAt,
              kind: "removed",
              position: i.position,
              part,
              score: null,
              verdict: "",
              detail: "",
            },
          ]
        : [fitted];
    }),
    ...h.crashes.map((c) => ({
      at: c.at,
      kind: "crash",
      position: c.positions.join("; "),
      part: "",
      score: null,
      verdict: c.severity,
      detail: c.note,
    })),
    ...h.inspections.map((i) => ({
      at: i.at,
      kind: "inspection",
      position: "",
      part: "",
      score: null,
      verdict: i.returnedToService ? "returned to service" : "",
      detail: `${i.signedOffBy}: ${i.findings}`,
    })),
    ...h.baselines.map((b) => ({
      at: b.setAt,
      kind: "baseline",
      position: "",
      part: "",
      score: null,
      verdict: b.active ? "active" : "",
      detail: `${b.setBy}: ${b.reason} (${b.logs.length} logs)`,
    })),
    ...h.logs.map((l) => ({
      at: l.flownAt,
      kind: "log",
      position: "",
      part: l.fileName,
      score: l.score,
      verdict: l.verdict ?? l.status,
      detail: l.findings.join(" | ") || (l.error ?? ""),
    })),
  ].sort((a, b) => a.at.getTime() - b.at.getTime());
  const header = ["at", "kind", "position", "part", "score", "verdict", "detail"];
  const lines = [
    header.join(","),
    ...rows.map((r) =>
      [r.at, r.kind, r.position, r.part, r.score === null ? "" : r.score, r.verdict, r.detail]
        .map(csvField)
        .join(","),
    ),
  ];
  return `${lines.join("\r\n")}\r\n`;
}
