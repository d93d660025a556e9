import "server-only";
import type { Actor } from "@/lib/roles";
import type { Tx } from "./db";

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
