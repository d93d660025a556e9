import "server-only";
import { ConflictError, InputError, NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { STANDARD_POSITIONS } from "@/lib/validations/airframe";
import { PART_KINDS, type PartInput, type SwapInput } from "@/lib/validations/part";
import { airframeOfTeam } from "./airframes";
import { audit } from "./audit";
import { db } from "./db";
import { assertRole } from "./authorize";

/** How much of a part's life is used: flights and minutes of logs flown while it was installed. */
export interface LifeUsed {
  flights: number;
  minutes: number;
  /** Largest share of a life limit used (1 = at the limit), or null without limits. */
  fraction: number | null;
}

export async function createParts(actor: Actor, input: PartInput) {
  assertRole(actor, "tech");
  const { quantity, ...data } = input;
  const count = quantity ?? 1;
  return db.$transaction(async (tx) => {
    const created = [];
    for (let i = 0; i < count; i++) {
      const label = data.label && count > 1 ? `${data.label}-${i + 1}` : data.label;
      created.push(
        await tx.part.create({ data: { ...data, label, teamId: actor.teamId, status: "stock" } }),
      );
    }
    await audit(
      tx,
      actor,
      "add to stock",
      "part",
      created[0]?.id ?? "",
      `${count} × ${data.kind} ${data.model}`,
    );
    return created;
  });
}

export async function partOfTeam(actor: Actor, partId: string) {
  const part = await db.part.findFirst({ where: { id: partId, teamId: actor.teamId } });
  if (!part) throw new NotFoundError("That part");
  return part;
}

/**
 * Swaps the part at a position: closes the open installation there (the old part goes to stock,
 * damaged or scrapped) and opens one for the new part. Both sides are recorded in one transaction.
 * A part is on one airframe at a time: the new part must be in stock.
 */
export async function swapPart(actor: Actor, input: SwapInput) {
  assertRole(actor, "tech");
  const airframe = await airframeOfTeam(actor, input.airframeId);
  const part = await partOfTeam(actor, input.newPartId);
  if (part.status !== "stock") {
    throw new ConflictError(
      `That ${part.kind} is ${part.status}, not in stock: a part can be on one airframe at a time.`,
    );
  }
  return db.$transaction(async (tx) => {
    const open = await tx.installation.findFirst({
      where: {
        airframeId: airframe.id,
        position: input.position,
        toAt: null,
        teamId: actor.teamId,
      },
    });
    if (open) {
      if (input.at < open.fromAt)
        throw new InputError("The swap time is before the current part was fitted.", "at");
      await tx.installation.update({
        where: { id: open.id },
        data: { toAt: input.at, removalReason: input.reason },
      });
      await tx.part.update({ where: { id: open.partId }, data: { status: input.removedStatus } });
    }
    // Re-check inside the transaction: a concurrent swap may have taken the part.
    const stillFree = await tx.installation.findFirst({ where: { partId: part.id, toAt: null } });
    if (stillFree) throw new ConflictError("That part was just fitted elsewhere.");
    const installation = await tx.installation.create({
      data: {
        teamId: actor.teamId,
        partId: part.id,
        airframeId: airframe.id,
        position: input.position,
        fromAt: input.at,
        reason: input.reason,
      },
    });
    await tx.part.update({ where: { id: part.id }, data: { status: "installed" } });
    await audit(
      tx,
      actor,
      "swap",
      "airframe",
      airframe.id,
      `${input.position}: ${part.kind} ${part.model}${part.label ? ` ${part.label}` : ""} on (${input.reason})`,
    );
    return { installation, removedPartId: open?.partId ?? null };
  });
}

export async function setPartStatus(
  actor: Actor,
  partId: string,
  status: "stock" | "damaged" | "scrapped",
) {
  assertRole(actor, "tech");
  const part = await partOfTeam(actor, partId);
  if (part.status === "installed")
    throw new ConflictError("Take the part off its airframe with a swap first.");
  return db.$transaction(async (tx) => {
    const p = await tx.part.update({ where: { id: part.id }, data: { status } });
    await audit(tx, actor, `mark ${status}`, "part", part.id, `${part.kind} ${part.model}`);
    return p;
  });
}

export function lifeFraction(
  used: { flights: number; minutes: number },
  part: { lifeFlights: number | null; lifeMinutes: number | null },
): number | null {
  const shares = [
    part.lifeFlights ? used.flights / part.lifeFlights : null,
    part.lifeMinutes ? used.minutes / part.lifeMinutes : null,
  ].filter((x): x is number => x !== null);
  return shares.length > 0 ? Math.max(...shares) : null;
}

type LifeLimits = { id: string; lifeFlights: number | null; lifeMinutes: number | null };

/**
 * The whole life so far of several parts, over every airframe each has been on: the flights and
 * minutes of logs flown while it was fitted. Two queries, however many parts.
 */
export async function lifeOfParts(parts: readonly LifeLimits[]): Promise<Map<string, LifeUsed>> {
  const installs = await db.installation.findMany({
    where: { partId: { in: parts.map((p) => p.id) } },
  });
  const logs = await db.flightLog.findMany({
    where: { airframeId: { in: [...new Set(installs.map((i) => i.airframeId))] } },
    select: { airframeId: true, flownAt: true, durationS: true },
  });
  const life = new Map<string, LifeUsed>();
  for (const part of parts) {
    let flights = 0;
    let minutes = 0;
    for (const i of installs) {
      if (i.partId !== part.id) continue;
      for (const l of logs) {
        if (l.airframeId !== i.airframeId || l.flownAt < i.fromAt || (i.toAt && l.flownAt > i.toAt))
          continue;
        flights++;
        minutes += (l.durationS ?? 0) / 60;
      }
    }
    life.set(part.id, { flights, minutes, fraction: lifeFraction({ flights, minutes }, part) });
  }
  return life;
}

const NO_LIFE: LifeUsed = { flights: 0, minutes: 0, fraction: null };

/** Parts on an airframe now, by position, with life used. */
export async function installedParts(actor: Actor, airframeId: string) {
  const installs = await db.installation.findMany({
    where: { airframeId, teamId: actor.teamId, toAt: null },
    include: { part: true },
  });
  const order = (p: string) => {
    const i = STANDARD_POSITIONS.indexOf(p);
    return i < 0 ? STANDARD_POSITIONS.length : i;
  };
  installs.sort(
    (a, b) => order(a.position) - order(b.position) || a.position.localeCompare(b.position),
  );
  const life = await lifeOfParts(installs.map((i) => i.part));
  return installs.map((i) => ({ ...i, life: life.get(i.partId) ?? NO_LIFE }));
}

/** Stock grouped by kind and model, with counts by status; low when fewer than `lowAt` in stock. */
export async function stockSummary(actor: Actor, lowAt = 2) {
  const parts = await db.part.findMany({
    where: { teamId: actor.teamId },
    orderBy: [{ kind: "asc" }, { model: "asc" }],
  });
  const groups = new Map<
    string,
    {
      kind: string;
      model: string;
      stock: number;
      installed: number;
      damaged: number;
      scrapped: number;
    }
  >();
  for (const p of parts) {
    const key = `${p.kind}\u0000${p.model}`;
    const g = groups.get(key) ?? {
      kind: p.kind,
      model: p.model,
      stock: 0,
      installed: 0,
      damaged: 0,
      scrapped: 0,
    };
    if (
      p.status === "stock" ||
      p.status === "installed" ||
      p.status === "damaged" ||
      p.status === "scrapped"
    )
      g[p.status]++;
    groups.set(key, g);
  }
  return [...groups.values()].map((g) => ({ ...g, low: g.stock < lowAt && g.installed > 0 }));
}

/** Parts in stock (ready to fit), by kind and model: the swap form's choices. */
export async function partsInStock(actor: Actor) {
  return db.part.findMany({
    where: { teamId: actor.teamId, status: "stock" },
    orderBy: [{ kind: "asc" }, { model: "asc" }],
  });
}

/**
 * The Parts screen's list: every part of one kind (or all kinds; an unknown kind is ignored), those
 * fitted to an airframe only when asked, each with the airframe it is on now.
 */
export async function listParts(actor: Actor, filter: { kind?: string; withFitted: boolean }) {
  const kind = PART_KINDS.find((k) => k === filter.kind);
  return db.part.findMany({
    where: {
      teamId: actor.teamId,
      ...(kind ? { kind } : {}),
      ...(filter.withFitted ? {} : { status: { not: "installed" } }),
    },
    orderBy: [{ kind: "asc" }, { model: "asc" }, { label: "asc" }],
    include: {
      installations: { where: { toAt: null }, include: { airframe: { select: { name: true } } } },
    },
  });
}

/** Every installation of a part, newest first: its history across airframes. */
export async function partHistory(actor: Actor, partId: string) {
  const part = await partOfTeam(actor, partId);
  const installs = await db.installation.findMany({
    where: { partId: part.id },
    include: { airframe: { select: { name: true } } },
    orderBy: { fromAt: "desc" },
  });
  return { part, installs, life: (await lifeOfParts([part])).get(part.id) ?? NO_LIFE };
}
