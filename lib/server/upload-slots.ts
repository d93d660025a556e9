import "server-only";
import { TooManyRequestsError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { db } from "./db";
import { queuedAnalysesPerTeam, uploadsPerCaller } from "./limits";

/**
 * Limits that keep one caller from filling the server: uploads streaming at once per member or
 * API token, and analyses waiting or running per team. Over either, the caller gets 429 with a
 * Retry-After. Counts are in memory: they describe this process's open requests.
 */

const state = globalThis as unknown as { heatcheckUploadSlots?: Map<string, number> };
state.heatcheckUploadSlots ??= new Map();
const open = state.heatcheckUploadSlots;

function callerKey(actor: Actor): string {
  return `${actor.teamId}:${actor.via}:${actor.userId ?? actor.name}`;
}

/** Takes an upload slot for the caller; call the returned function once the upload is done. */
export async function takeUploadSlot(actor: Actor): Promise<() => void> {
  const key = callerKey(actor);
  const limit = uploadsPerCaller();
  const now = open.get(key) ?? 0;
  if (now >= limit) {
    throw new TooManyRequestsError(
      `You already have ${limit} uploads running; wait for one to finish and try again.`,
      5,
    );
  }
  // Taken before the first await, so parallel requests cannot all pass the check.
  open.set(key, now + 1);
  let released = false;
  const release = () => {
    if (released) return;
    released = true;
    const left = (open.get(key) ?? 1) - 1;
    if (left <= 0) open.delete(key);
    else open.set(key, left);
  };
  try {
    const queued = await db.flightLog.count({ where: { teamId: actor.teamId, status: "pending" } });
    const max = queuedAnalysesPerTeam();
    if (queued >= max) {
      throw new TooManyRequestsError(
        `Your team already has ${queued} logs waiting for analysis; try again when some are done.`,
        30,
      );
    }
  } catch (e) {
    release();
    throw e;
  }
  return release;
}
