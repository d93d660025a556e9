import "server-only";
import type { Actor } from "@/lib/roles";
import { db, type Tx } from "./db";

/** Records who changed what. Called inside the same transaction as the change. */
export async function audit(
  tx: Tx,
  actor: Actor,
  action: string,
  entity: string,
  entityId: string,
  detail = "",
): Promise<void> {
  await tx.auditEntry.create({
    data: {
      teamId: actor.teamId,
      userId: actor.userId,
      userName: actor.name,
      action,
      entity,
      entityId,
      detail: detail.slice(0, 500),
    },
  });
}

/**
 * One write and its audit entry in one transaction: `write` makes or changes a record, the entry
 * names it by id with `detail(record)`. Returns the record.
 */
export function writeAudited<T extends { id: string }>(
  actor: Actor,
  [action, entity]: readonly [action: string, entity: string],
  write: (tx: Tx) => Promise<T>,
  detail: (record: T) => string,
): Promise<T> {
  return db.$transaction(async (tx) => {
    const record = await write(tx);
    await audit(tx, actor, action, entity, record.id, detail(record));
    return record;
  });
}
