import "server-only";
import { repairsSince, type Repair } from "@/lib/health/repair-effects";
import type { db, Tx } from "./db";

/**
 * When a baseline's airframe was last in the state the baseline describes: the flight time of its
 * newest log (a part swapped between that flight and the moment the baseline was saved still makes
 * it stale).
 */
export async function baselineFlownAt(client: Tx | typeof db, baselineId: string): Promise<Date> {
  const logs = await client.baselineLog.findMany({
    where: { baselineId },
    select: { log: { select: { flownAt: true } } },
  });
  return logs.reduce((t, l) => (l.log.flownAt > t ? l.log.flownAt : t), new Date(0));
}

/** Spectrum-changing parts fitted to an airframe after `after` and up to `upTo` (inclusive). */
export async function repairsBetween(
  client: Tx | typeof db,
  airframeId: string,
  after: Date,
  upTo: Date = new Date(8.64e15),
): Promise<Repair[]> {
  const fitted = await client.installation.findMany({
    where: { airframeId, fromAt: { gt: after, lte: upTo } },
    select: { fromAt: true, position: true, part: { select: { kind: true, model: true } } },
    orderBy: { fromAt: "asc" },
  });
  return repairsSince(
    after,
    fitted.map((f) => ({
      at: f.fromAt,
      position: f.position,
      kind: f.part.kind,
      model: f.part.model,
    })),
  );
}
