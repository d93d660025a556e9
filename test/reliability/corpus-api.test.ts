import { rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import { openSqlite } from "../support/sqlite";
import { buildCorpus, type CorpusCase } from "./corpus";
import {
  addToken,
  filesUnder,
  seededDataDir,
  startThroughScript,
  upload,
  type RunningApp,
} from "./harness";

// The malformed corpus (corpus.ts, expected outcomes in corpus-table.md, from the README's reading
// rules) through the upload API of the running app: a file the reader accepts is answered 200; a
// file it refuses is answered before anything is recorded — 400 for a bad column map, 422 for a
// file that cannot be read or is too short for one analysis segment, 413 over the size limit —
// with the same sentence, line and column the reader gives, and nothing is kept. HTTP statuses per
// RFC 9110 §15.5. Cases that need their own size limit (maxMb) are left to the reader half.

const STATUS: Record<string, number> = { "bad-input": 400, "bad-log": 422, "limit-exceeded": 413 };
let app: RunningApp;
let token: string;

beforeAll(async () => {
  app = await startThroughScript(seededDataDir("corpus-api"));
  token = addToken(app.dataDir);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  if (app) rmSync(app.dataDir, { recursive: true, force: true });
});

function logCount(): number {
  const db = openSqlite(join(app.dataDir, "heatcheck.db"), true);
  try {
    return Number(db.prepare(`SELECT count(*) AS n FROM "FlightLog"`).get()?.n ?? -1);
  } finally {
    db.close();
  }
}

it("every corpus case gets the reader's verdict from the API, and refused files leave nothing", async () => {
  const cases = buildCorpus().filter((c) => c.maxMb === undefined);
  expect(cases.length).toBeGreaterThanOrEqual(200);
  const mismatches: string[] = [];
  let accepted = 0;
  let refused = 0;
  const acceptedIds = new Set<string>();
  const check = (c: CorpusCase, ok: boolean, what: string) => {
    if (!ok) mismatches.push(`${c.id}: ${what}`);
  };
  for (const c of cases) {
    const before = logCount();
    const fields: Record<string, string> = {
      airframe: "HV-01",
      ...(c.map ? { mapText: c.map } : {}),
    };
    const r = await upload(app.url, c.bytes, { token, fileName: `${c.id}.csv`, fields });
    const body = (r.body.startsWith("{") ? r.json() : {}) as {
      logId?: unknown;
      error?: unknown;
      code?: unknown;
    };
    const e = c.expect;
    if (e.outcome === "accepted") {
      accepted++;
      check(c, r.status === 200, `expected 200, got ${r.status} ${r.body.slice(0, 200)}`);
      if (r.status === 200) acceptedIds.add(String(body.logId));
      continue;
    }
    refused++;
    const message = typeof body.error === "string" ? body.error : "";
    check(
      c,
      r.status === STATUS[e.code],
      `expected ${STATUS[e.code]}, got ${r.status} ${r.body.slice(0, 200)}`,
    );
    check(c, body.code === e.code, `code ${String(body.code)} instead of ${e.code}`);
    check(
      c,
      message.includes(e.sentence),
      `message "${message.slice(0, 200)}" lacks "${e.sentence}"`,
    );
    if (e.line !== undefined)
      check(
        c,
        new RegExp(`\\bline ${e.line}\\b`).test(message),
        `message does not name line ${e.line}: ${message.slice(0, 160)}`,
      );
    if (e.column !== undefined)
      check(
        c,
        new RegExp(`\\bcolumn ${e.column}\\b`).test(message),
        `message does not name column ${e.column}: ${message.slice(0, 160)}`,
      );
    check(c, logCount() === before, "a record was kept");
  }
  console.log(
    `corpus through the API: ${cases.length} cases, ${accepted} accepted, ${refused} refused, ${mismatches.length} mismatches`,
  );
  expect(mismatches).toEqual([]);
  expect(filesUnder(join(app.dataDir, "uploads")).filter((f) => f.includes("incoming-"))).toEqual(
    [],
  );
  expect(acceptedIds.size).toBeGreaterThan(0);
}, 300_000);
