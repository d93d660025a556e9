import "server-only";
import { ServerBusyError, TooManyRequestsError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { db } from "./db";
import { queuedAnalysesPerTeam, uploadsAtOnce, uploadsPerCaller } from "./limits";

/**
 * Limits that keep one caller from filling the server: uploads streaming at once per member or
 * API token, and analyses waiting or running per team (over either: 429 with Retry-After); and
 * the uploads the whole server streams at once (over it: 503 with Retry-After, since the server is
 * busy, not the caller at fault). Counts are in memory: they describe this process's open requests.
 */

const state = globalThis as unknown as {
  heatcheckUploadSlots?: Map<string, number>;
  heatcheckUploadsOpen?: { n: number };
};
state.heatcheckUploadSlots ??= new Map();
state.heatcheckUploadsOpen ??= { n: 0 };
const open = state.heatcheckUploadSlots;
const serverWide = state.heatcheckUploadsOpen;

/**
 * Seconds a refused upload is told to wait: about the time one 15 MB upload takes when it has the
 * server to itself; the uploads that finish meanwhile make room. Jittered by the client.
 */
const BUSY_RETRY_S = 1;

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
  if (serverWide.n >= uploadsAtOnce()) {
    throw new ServerBusyError(
      "The server is taking as many uploads as it can right now; nothing was kept, try again in a moment.",
      BUSY_RETRY_S,
    );
  }
  // Taken before the first await, so parallel requests cannot all pass the checks.
  open.set(key, now + 1);
  serverWide.n++;
  let released = false;
  const release = () => {
    if (released) return;
    released = true;
    serverWide.n--;
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
