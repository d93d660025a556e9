import "server-only";
import { rankQueue, type AirframeFacts, type QueueEntry } from "@/lib/health/queue-rank";
import { repairsSince, staleBaselineReason } from "@/lib/health/repair-effects";
import type { Actor } from "@/lib/roles";
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
// is computed once per change of the database (SQLite's change counter of this connection, and
// data_version for commits by another process such as a seed) and shared by concurrent readers.
interface CachedRanking {
  version: string;
  at: number;
  ranked: Promise<Ranked>;
}
const cache = ((
  globalThis as unknown as { heatcheckQueueCache?: Map<string, CachedRanking> }
).heatcheckQueueCache ??= new Map<string, CachedRanking>());

async function databaseVersion(): Promise<string> {
  const [row] = await db.$queryRaw<
    { c: bigint | number; d: bigint | number }[]
  >`SELECT total_changes() AS c, (SELECT data_version FROM pragma_data_version) AS d`;
  return `${String(row?.c)}:${String(row?.d)}`;
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
