import "server-only";
import { rankQueue, type AirframeFacts, type QueueEntry } from "@/lib/health/queue-rank";
import { repairsSince, staleBaselineReason } from "@/lib/health/repair-effects";
import type { Actor } from "@/lib/roles";
import { open, stat, type FileHandle } from "node:fs/promises";
import { databaseFile } from "./data-folder";
import { db } from "./db";
import { fleetPlacement } from "./fleet";
import { lifeOfParts } from "./parts";
import { decodeCrashPositions, decodeFindings, decodeStatus } from "./stored";

/** The next heat of the team that has not started more than an hour ago, with its airframes. */
export async function nextHeat(actor: Actor) {
  return db.heat.findFirst({
    where: { teamId: actor.teamId, startsAt: { gte: new Date(Date.now() - 3600_000) } },
    orderBy: { startsAt: "asc" },
    include: { entries: true, event: { select: { name: true } } },
  });
}

type Heat = Awaited<ReturnType<typeof nextHeat>>;
interface Ranked {
  entries: QueueEntry[];
  heat: Heat;
}

/** A ranking is reused for this long at most, because "next heat" moves with the clock. */
const QUEUE_MAX_AGE_MS = 10_000;

// The queue is read by every pit screen every few seconds and written rarely. SQLite work runs on
// the event loop, so recomputing it per request starved uploads under 50 readers. A team's ranking
// is computed once per change of the database and shared by concurrent readers.
interface CachedRanking {
  version: string;
  at: number;
  ranked: Promise<Ranked>;
}
const cache = ((
  globalThis as unknown as { heatcheckQueueCache?: Map<string, CachedRanking> }
).heatcheckQueueCache ??= new Map<string, CachedRanking>());

/**
 * Changes whenever any connection of any process commits: SQLite's file change counter (the
 * big-endian 32-bit integer at offset 24 of the database header, which SQLite increments each time
 * it unlocks a file it modified — sqlite.org/fileformat.html §1.3.8), plus the WAL file's size and
 * time should the database ever run in WAL mode, where the counter moves only at checkpoints.
 * SQLite's own counters do not serve here: total_changes() and data_version are per connection,
 * the adapter answers from more than one, so the key flipped between them and the ranking was
 * recomputed on nearly every read. A database that is not a local file has no key;
 * QUEUE_MAX_AGE_MS then bounds how stale a ranking can be.
 */
async function databaseVersion(): Promise<string> {
  const file = databaseFile();
  if (!file) return "";
  const counter = await readChangeCounter(file);
  const wal = await stat(`${file}-wal`).then(
    (s) => `${s.mtimeMs}:${s.size}`,
    () => "-",
  );
  return `${counter}|${wal}`;
}

async function readChangeCounter(file: string): Promise<string> {
  let fh: FileHandle | undefined;
  try {
    fh = await open(file, "r");
    const header = Buffer.alloc(4);
    await fh.read(header, 0, 4, 24);
    return String(header.readUInt32BE(0));
  } catch {
    return "-";
  } finally {
    await fh?.close();
  }
}

/** Every active airframe of the team, ranked for inspection before the next heat. */
export async function inspectionQueue(
  actor: Actor,
  options: { onlyNextHeat?: boolean } = {},
): Promise<Ranked> {
  const version = await databaseVersion();
  let hit = cache.get(actor.teamId);
  if (!hit || hit.version !== version || Date.now() - hit.at > QUEUE_MAX_AGE_MS) {
    hit = { version, at: Date.now(), ranked: rankTeam(actor) };
    cache.set(actor.teamId, hit);
    const mine = hit;
    mine.ranked.catch(() => {
      if (cache.get(actor.teamId) === mine) cache.delete(actor.teamId);
    });
  }
  const { entries, heat } = await hit.ranked;
  return {
    entries: options.onlyNextHeat && heat ? entries.filter((e) => e.inNextHeat) : entries,
    heat,
  };
}

async function rankTeam(actor: Actor): Promise<Ranked> {
  const heat = await nextHeat(actor);
  const inHeat = new Set(heat?.entries.map((e) => e.airframeId) ?? []);
  const airframes = await db.airframe.findMany({
    where: { teamId: actor.teamId, retired: false },
    include: {
      crashes: { orderBy: { at: "desc" } },
      inspections: { orderBy: { at: "desc" }, take: 1 },
      installations: { where: { toAt: null }, include: { part: true } },
      baselines: {
        where: { active: true },
        take: 1,
        orderBy: { createdAt: "desc" },
        include: { logs: { select: { log: { select: { flownAt: true } } } } },
      },
      logs: { orderBy: { flownAt: "desc" }, select: { flownAt: true } },
    },
  });
  // Life is counted over each part's whole history, as on the parts screens, in one go for the fleet.
  const fleet = new Map((await fleetPlacement(actor)).placements.map((p) => [p.airframeId, p]));
  const limited = airframes.flatMap((a) =>
    a.installations.filter((i) => i.part.lifeFlights || i.part.lifeMinutes),
  );
  const life = await lifeOfParts(limited.map((i) => i.part));
  const facts: AirframeFacts[] = [];
  for (const a of airframes) {
    const lastInspection = a.inspections[0]?.at ?? new Date(0);
    const baseline = a.baselines[0];
    const latestAssessment = baseline
      ? await db.assessment.findFirst({
          where: { baselineId: baseline.id, log: { airframeId: a.id } },
          orderBy: { log: { flownAt: "desc" } },
          include: { log: { select: { flownAt: true } } },
        })
      : null;
    const partsPastLife = a.installations.flatMap((i) => {
      const fraction = life.get(i.partId)?.fraction ?? 0;
      return fraction >= 1
        ? [{ position: i.position, what: `${i.part.model} (${i.part.kind})`, fraction }]
        : [];
    });
    const lastLog = a.logs[0]?.flownAt ?? new Date(0);
    // Parts still fitted that went on after the baseline's flights and change the spectrum.
    const baselineAt = baseline?.logs.reduce(
      (t, l) => (l.log.flownAt > t ? l.log.flownAt : t),
      new Date(0),
    );
    const repairs = baselineAt
      ? repairsSince(
          baselineAt,
          a.installations.map((i) => ({
            at: i.fromAt,
            position: i.position,
            kind: i.part.kind,
            model: i.part.model,
          })),
        )
      : [];
    const firstRepair = repairs[0]?.at;
    const staleBaseline = firstRepair
      ? {
          reason: staleBaselineReason(
            repairs,
            a.logs.filter((l) => l.flownAt > firstRepair).length,
          ),
        }
      : null;
    const lastWork = [
      ...a.inspections.map((x) => ({ what: "inspection", at: x.at })),
      ...a.installations.map((x) => ({ what: `${x.position} swap`, at: x.fromAt })),
    ].sort((x, y) => y.at.getTime() - x.at.getTime())[0];
    facts.push({
      id: a.id,
      name: a.name,
      state: a.state,
      latest: latestAssessment
        ? {
            status: decodeStatus(latestAssessment.status),
            score: latestAssessment.score,
            findings: decodeFindings(latestAssessment.findings),
            flownAt: latestAssessment.log.flownAt,
          }
        : null,
      hasBaseline: !!baseline,
      staleBaseline,
      fleet: fleet.get(a.id) ?? null,
      openCrashes: a.crashes
        .filter((c) => c.at > lastInspection)
        .map((c) => ({
          at: c.at,
          severity: c.severity,
          positions: decodeCrashPositions(c.positions),
        })),
      partsPastLife,
      noLogSince: lastWork && lastWork.at > lastLog ? lastWork : null,
      inNextHeat: inHeat.has(a.id),
    });
  }
  return { entries: rankQueue(facts), heat };
}
