import "server-only";
import type { Actor } from "@/lib/roles";
import { fleetTable } from "./fleet";
import { inspectionQueue } from "./queue";

/**
 * The Fleet table's rows with the inspection queue's verdict for each active airframe, so both
 * screens say the same about it: the queue weighs more than the latest log's score (crashes not
 * inspected, a baseline made stale by a repair or questioned by the fleet, parts past their life).
 * The score beside it stays the latest log's own.
 */
export async function fleetOverview(actor: Actor) {
  const [rows, queue] = await Promise.all([fleetTable(actor), inspectionQueue(actor)]);
  const byId = new Map(queue.entries.map((e) => [e.id, e]));
  return rows.map((row) => {
    const entry = row.retired ? undefined : byId.get(row.id);
    return {
      ...row,
      status: entry?.status ?? null,
      firstReason: entry?.reasons[0] ?? null,
    };
  });
}
