import type { Finding } from "./compare";
import { STATUS_ORDER, worstStatus, type Status } from "./thresholds";

/**
 * Ranks airframes for the pits: which to pull and inspect before the next heat, with the reasons
 * in words. Pure: the server gathers the facts, this decides the order.
 */

export interface AirframeFacts {
  id: string;
  name: string;
  /** ready | grounded, as the crew set it */
  state: string;
  latest: { status: Status; score: number | null; findings: Finding[]; flownAt: Date } | null;
  hasBaseline: boolean;
  /** The fleet's view: of the baseline (questioned when off its sisters) or, with none, of the latest log. */
  fleet?: {
    judged: "baseline" | "log" | null;
    notes: { text: string; severity: Exclude<Status, "ok"> }[];
  } | null;
  /** Set when parts that change the spectrum were fitted after the baseline's flights. */
  staleBaseline?: { reason: string } | null;
  openCrashes: { at: Date; severity: string; positions: string[] }[];
  partsPastLife: { position: string; what: string; fraction: number }[];
  /** The last crash repair, inspection or swap, when no log has been flown since. */
  noLogSince: { what: string; at: Date } | null;
  inNextHeat: boolean;
}

export interface QueueEntry {
  id: string;
  name: string;
  status: Status;
  score: number | null;
  reasons: string[];
  inNextHeat: boolean;
  state: string;
}

const DAY = new Intl.DateTimeFormat("en-GB", {
  day: "numeric",
  month: "short",
  hour: "2-digit",
  minute: "2-digit",
  timeZone: "UTC",
});

export function rankQueue(fleet: readonly AirframeFacts[]): QueueEntry[] {
  const entries = fleet.map((a) => {
    const reasons: string[] = [];
    let status: Status = a.latest?.status ?? "ok";
    if (a.state === "grounded") {
      reasons.push("grounded until an inspection returns it to service");
      status = worstStatus(status, "ground");
    }
    for (const c of a.openCrashes) {
      reasons.push(
        `${c.severity} crash on ${DAY.format(c.at)} UTC${c.positions.length ? ` (${c.positions.join(", ")})` : ""} with no inspection since`,
      );
      status = worstStatus(status, c.severity === "minor" ? "inspect" : "ground");
    }
    if (a.latest && a.latest.score === null) {
      // No score is not a good score: a log without usable signal says nothing about the quad.
      reasons.push(
        "log unusable: the latest log could not be compared with the baseline (see its notes); fly a short check and upload it",
      );
      status = worstStatus(status, "watch");
    }
    for (const f of a.latest?.findings.slice(0, 3) ?? []) reasons.push(f.text);
    for (const p of a.partsPastLife) {
      reasons.push(
        `${p.what} at ${p.position} has used ${Math.round(p.fraction * 100)} % of its life limit: replace it`,
      );
      status = worstStatus(status, "watch");
    }
    // A stale baseline already says "fly one log"; the plain no-log reason would say it twice.
    if (a.noLogSince && !a.staleBaseline) {
      reasons.push(
        `no log flown since the ${a.noLogSince.what} on ${DAY.format(a.noLogSince.at)} UTC: fly a short check and upload it`,
      );
      status = worstStatus(status, "watch");
    }
    if (a.staleBaseline) {
      // The baseline no longer describes the airframe: at least watch until a new one is confirmed.
      reasons.push(a.staleBaseline.reason);
      status = worstStatus(status, "watch");
    }
    for (const n of a.fleet?.notes.slice(0, 2) ?? []) {
      reasons.push(n.text);
      status = worstStatus(status, n.severity);
    }
    if (!a.hasBaseline) {
      // Unjudged, or judged only against its sisters: never ok until it has a baseline of its own.
      reasons.push(
        a.fleet?.judged === "log"
          ? "no baseline of its own: its latest log was judged against the fleet only — choose known-good logs for a baseline"
          : "no baseline set, so vibration is not judged: choose known-good logs for one",
      );
      status = worstStatus(status, "watch");
    } else if (!a.latest) {
      reasons.push("no log analysed since the baseline");
    }
    const score = a.latest?.score ?? null;
    return {
      id: a.id,
      name: a.name,
      status,
      score,
      reasons,
      inNextHeat: a.inNextHeat,
      state: a.state,
    };
  });
  // Status first, then the lower score (no score counts as 100: nothing judged against it), then
  // the longer list of reasons, then the name. Compared in turn, not added up: below 10 the score
  // moves in tenths, and a reason more must not outrank a worse score.
  return entries.sort(
    (x, y) =>
      STATUS_ORDER.indexOf(y.status) - STATUS_ORDER.indexOf(x.status) ||
      (x.score ?? 100) - (y.score ?? 100) ||
      y.reasons.length - x.reasons.length ||
      x.name.localeCompare(y.name),
  );
}
