import "server-only";
import type { Writable } from "node:stream";
import { TarWriter } from "@/lib/archive/tar";
import { DECISION_AID_NOTE } from "@/lib/health/safety";
import { csvField } from "./csv";
import { storedFileOf } from "./data-folder";
import { db } from "./db";

/**
 * One team's records and original logs as a documented archive (gzip the stream for .tar.gz), so
 * a team can leave a server or move to another. Layout (README "Team export"):
 *
 *     README.txt            what is in here
 *     team.json             every record of the team, one array per kind (format heatcheck-team-export, version 1)
 *     csv/<kind>.csv        the same records as tables (RFC 4180), one per kind
 *     analyses/<log>.json   each log's analysis result
 *     originals/<log>.csv   each uploaded original, byte for byte
 *
 * Password hashes and token hashes are never exported.
 */

export const TEAM_EXPORT_FORMAT = "heatcheck-team-export";

type Row = Record<string, unknown>;

/** RFC 4180: fields with a comma, quote or line break are quoted, quotes doubled. */
export function toCsv(rows: readonly Row[], columns?: readonly string[]): string {
  const cols = columns ?? [...new Set(rows.flatMap((r) => Object.keys(r)))];
  return (
    [cols.join(","), ...rows.map((r) => cols.map((c) => csvField(r[c])).join(","))].join("\r\n") +
    "\r\n"
  );
}

function parsed(json: string): unknown {
  try {
    return JSON.parse(json) as unknown;
  } catch {
    return json;
  }
}

export async function collectTeam(teamId: string) {
  const team = await db.team.findUnique({ where: { id: teamId } });
  if (!team) throw new Error(`no team ${teamId}`);
  const where = { teamId };
  const [
    members,
    airframes,
    parts,
    installations,
    crashes,
    inspections,
    events,
    heats,
    logs,
    baselines,
    importProfiles,
    tokens,
    audit,
  ] = await Promise.all([
    db.membership.findMany({ where, include: { user: { select: { name: true, email: true } } } }),
    db.airframe.findMany({ where, orderBy: { name: "asc" } }),
    db.part.findMany({ where, orderBy: { createdAt: "asc" } }),
    db.installation.findMany({ where, orderBy: { fromAt: "asc" } }),
    db.crash.findMany({ where, orderBy: { at: "asc" } }),
    db.inspection.findMany({ where, orderBy: { at: "asc" } }),
    db.event.findMany({ where, orderBy: { startsAt: "asc" } }),
    db.heat.findMany({ where, orderBy: { startsAt: "asc" }, include: { entries: true } }),
    db.flightLog.findMany({ where, orderBy: { flownAt: "asc" } }),
    db.baseline.findMany({
      where,
      orderBy: { createdAt: "asc" },
      include: { logs: { select: { logId: true } } },
    }),
    db.importProfile.findMany({ where }),
    db.apiToken.findMany({
      where,
      select: {
        id: true,
        name: true,
        prefix: true,
        createdById: true,
        createdAt: true,
        lastUsedAt: true,
        revokedAt: true,
      },
    }),
    db.auditEntry.findMany({ where, orderBy: { at: "asc" } }),
  ]);
  const logIds = logs.map((l) => l.id);
  const assessments = await db.assessment.findMany({
    where: { logId: { in: logIds } },
    orderBy: { createdAt: "asc" },
  });
  return {
    team,
    members: members.map((m) => ({
      userId: m.userId,
      name: m.user.name,
      email: m.user.email,
      role: m.role,
    })),
    airframes,
    parts,
    installations,
    crashes: crashes.map((c) => ({ ...c, positions: parsed(c.positions) })),
    inspections: inspections.map((i) => ({ ...i, checklist: parsed(i.checklist) })),
    events,
    heats: heats.map(({ entries, ...h }) => ({
      ...h,
      airframeIds: entries.map((e) => e.airframeId),
    })),
    logs: logs.map(({ storedPath, ...l }) => ({
      ...l,
      original: `originals/${l.id}.csv`,
      analysis: `analyses/${l.id}.json`,
      storedPath,
    })),
    baselines: baselines.map(({ logs: bl, json, ...b }) => ({
      ...b,
      logIds: bl.map((x) => x.logId),
      baseline: parsed(json),
    })),
    assessments: assessments.map((a) => ({
      ...a,
      findings: parsed(a.findings),
      notCompared: parsed(a.notCompared),
    })),
    importProfiles,
    tokens,
    audit,
  };
}

const README = `heatcheck team export
=====================

team.json         every record of the team: { format: "${TEAM_EXPORT_FORMAT}", version: 1, exportedAt,
                  team, members, airframes, parts, installations, crashes, inspections, events, heats,
                  logs, baselines, assessments, importProfiles, tokens, audit }. Times are ISO 8601 UTC.
                  Ids link records (installation.partId -> parts[].id, log.airframeId -> airframes[].id …).
csv/<kind>.csv    the same records as tables (RFC 4180, UTF-8, CRLF); list-valued fields hold JSON.
analyses/<id>.json  the analysis result of log <id> (spectra, peaks, throttle bands, motor orders).
originals/<id>.csv  the uploaded log <id>, byte for byte (logs[].fileName is its name when uploaded).

Password hashes and API token hashes are not exported. ${DECISION_AID_NOTE}
`;

/** Writes the archive (uncompressed tar) to `out`; returns what it holds. */
export async function writeTeamExport(
  teamId: string,
  out: Writable,
): Promise<{ records: number; originals: number; missing: number }> {
  const data = await collectTeam(teamId);
  const tar = new TarWriter(out);
  const doc = {
    format: TEAM_EXPORT_FORMAT,
    version: 1,
    exportedAt: new Date().toISOString(),
    ...data,
  };
  await tar.bytes("README.txt", README);
  await tar.bytes("team.json", JSON.stringify(doc, null, 2) + "\n");
  let records = 0;
  for (const [kind, rows] of Object.entries(data)) {
    if (!Array.isArray(rows)) continue;
    records += rows.length;
    await tar.bytes(`csv/${kind}.csv`, toCsv(rows));
  }
  for (const l of data.logs) {
    const a = await db.analysis.findUnique({ where: { logId: l.id }, select: { json: true } });
    if (a) await tar.bytes(`analyses/${l.id}.json`, a.json);
  }
  let originals = 0;
  let missing = 0;
  for (const l of data.logs) {
    try {
      await tar.file(`originals/${l.id}.csv`, storedFileOf(l.storedPath));
      originals++;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "ENOENT") throw e;
      missing++;
    }
  }
  await tar.end();
  return { records, originals, missing };
}
