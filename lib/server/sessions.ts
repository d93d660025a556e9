import "server-only";
import { UnauthenticatedError } from "@/lib/errors";
import { db } from "./db";
import { sessionById } from "./request-reads";

/**
 * Sessions a server can end. The session cookie is a signed next-auth JWT that carries only a
 * session id and the user id; the row here is the truth and the guard reads it on every request.
 *
 * Lifetimes, chosen for a pit crew on a race day (README "Running a shared server"):
 *  - idle: 2 hours. Heats are usually well under two hours apart, so a pilot who signed in for
 *    the first heat is still signed in for the next; a laptop left open over a long lunch break
 *    is not. The queue screen refreshes itself every 20 s, so a pit screen stays signed in.
 *  - absolute: 12 hours. Everyone signs in once per race day; nobody stays signed in overnight.
 * (OWASP ASVS 4.0 §3.3.2 asks 12 hours absolute at level 2; its 30-minute idle limit is too short
 * for the gaps between heats, hence 2 hours.)
 */
export const SESSION_IDLE_MS = 2 * 3600_000;
export const SESSION_ABSOLUTE_MS = 12 * 3600_000;
/** lastSeenAt is written at most this often, so reading pages does not write the database each time. */
const TOUCH_EVERY_MS = 60_000;

export type SessionEndReason =
  "sign-out" | "password change" | "removed from a team" | "account disabled" | "idle" | "expired";

export async function startSession(userId: string): Promise<string> {
  const s = await db.session.create({ data: { userId } });
  return s.id;
}

/** Throws UnauthenticatedError unless the session is open, its user's, and within both lifetimes. */
export async function assertSessionOpen(
  sessionId: string,
  userId: string,
  now = new Date(),
): Promise<void> {
  const s = await sessionById(sessionId);
  if (!s || s.userId !== userId || s.endedAt)
    throw new UnauthenticatedError("Your session has ended; sign in again.");
  const reason: SessionEndReason | null =
    now.getTime() - s.createdAt.getTime() > SESSION_ABSOLUTE_MS
      ? "expired"
      : now.getTime() - s.lastSeenAt.getTime() > SESSION_IDLE_MS
        ? "idle"
        : null;
  if (reason) {
    await db.session.update({ where: { id: s.id }, data: { endedAt: now, endedReason: reason } });
    throw new UnauthenticatedError("Your session has ended; sign in again.");
  }
  if (now.getTime() - s.lastSeenAt.getTime() > TOUCH_EVERY_MS) {
    await db.session.update({ where: { id: s.id }, data: { lastSeenAt: now } });
  }
}

export async function endSession(sessionId: string, reason: SessionEndReason): Promise<void> {
  await db.session.updateMany({
    where: { id: sessionId, endedAt: null },
    data: { endedAt: new Date(), endedReason: reason },
  });
}

/** Ends every open session of a user, except `keep` (the caller's own, after a password change). */
export async function endUserSessions(
  userId: string,
  reason: SessionEndReason,
  keep?: string,
): Promise<number> {
  const r = await db.session.updateMany({
    where: { userId, endedAt: null, ...(keep ? { id: { not: keep } } : {}) },
    data: { endedAt: new Date(), endedReason: reason },
  });
  return r.count;
}
