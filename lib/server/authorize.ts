import "server-only";
import { createHash } from "node:crypto";
import { ForbiddenError } from "@/lib/errors";
import { roleAtLeast, type Actor, type Role } from "@/lib/roles";

/** Role checks and token hashing, free of any request: services call these on the Actor. */

/** Throws ForbiddenError unless the actor's role is at least `minimum`. Services call it too. */
export function assertRole(actor: Actor, minimum: Role): void {
  if (!roleAtLeast(actor.role, minimum)) {
    throw new ForbiddenError(
      `This needs the ${minimum} role or higher; you are ${actor.role === "owner" ? "an" : "a"} ${actor.role}.`,
    );
  }
}

/** SHA-256 of an API token, as stored. */
export function hashToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}
