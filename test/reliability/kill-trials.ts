import { mulberry32 } from "@/lib/demo/random";
import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { demoCsv } from "@/lib/demo/demo-csv";
import { openSqlite } from "../support/sqlite";
import { filesUnder, startThroughScript, upload, type RunningApp } from "./harness";

/**
 * `kill -9` during uploads and analyses, then the integrity checks: SQLite's own integrity and
 * foreign-key checks, every recorded log's original present with its recorded SHA-256, no upload
 * that was answered 200 missing, and after the restart no temporary or unnamed file left and no
 * log still pending once the resumed analyses finish.
 */
export interface TrialReport {
  trials: number;
  answered200: number;
  lost: number;
  integrityFailures: string[];
  leftovers: number;
  stuckPending: number;
  restartMs: number[];
}

/** Deterministic pseudo-random numbers (mulberry32, lib/demo/random.ts), so a failing trial can be replayed. */
export const seeded = mulberry32;

export function integrity(
  dataDir: string,
  answeredIds: ReadonlySet<string>,
): { problems: string[]; lost: number; pending: number } {
  const problems: string[] = [];
  // Read-write, as the server's next start opens it: a hot journal left by the kill is rolled back.
  const db = openSqlite(join(dataDir, "heatcheck.db"));
  try {
    const check = db.pragma("integrity_check", { simple: true });
    if (check !== "ok") problems.push(`integrity_check: ${String(check)}`);
    const fk = db.pragma("foreign_key_check") as unknown[];
    if (fk.length > 0) problems.push(`foreign_key_check: ${fk.length} rows`);
    const logs = db
      .prepare(`SELECT id, "storedPath" AS p, "contentHash" AS h, status FROM "FlightLog"`)
      .all();
    const ids = new Set(logs.map((l) => String(l.id)));
    for (const l of logs) {
      const file = join(dataDir, String(l.p));
      if (!existsSync(file)) problems.push(`log ${String(l.id)}: original missing`);
      else if (createHash("sha256").update(readFileSync(file)).digest("hex") !== l.h)
        problems.push(`log ${String(l.id)}: original differs from its hash`);
    }
    const lost = [...answeredIds].filter((id) => !ids.has(id)).length;
    return { problems, lost, pending: logs.filter((l) => l.status === "pending").length };
  } finally {
    db.close();
  }
}

/** Files in uploads/ that are temporaries or that no record names. */
export function leftovers(dataDir: string): string[] {
  const db = openSqlite(join(dataDir, "heatcheck.db"), true);
  try {
    const named = new Set(
      db
        .prepare(`SELECT "storedPath" AS p FROM "FlightLog"`)
        .all()
        .map((l) => String(l.p)),
    );
    return filesUnder(join(dataDir, "uploads")).filter((f) => !named.has(`uploads/${f}`));
  } finally {
    db.close();
  }
}

async function waitNoPending(app: RunningApp, timeoutMs: number): Promise<number> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const db = openSqlite(join(app.dataDir, "heatcheck.db"), true);
    const n = Number(
      db.prepare(`SELECT count(*) AS n FROM "FlightLog" WHERE status = 'pending'`).get()?.n ?? 0,
    );
    db.close();
    if (n === 0 || Date.now() > deadline) return n;
    await new Promise((r) => setTimeout(r, 300));
  }
}

export async function killTrials(
  first: RunningApp,
  token: string,
  trials: number,
  seed = 1,
): Promise<{ report: TrialReport; app: RunningApp }> {
  const random = seeded(seed);
  const report: TrialReport = {
    trials,
    answered200: 0,
    lost: 0,
    integrityFailures: [],
    leftovers: 0,
    stuckPending: 0,
    restartMs: [],
  };
  const answered = new Set<string>();
  let app = first;
  for (let t = 0; t < trials; t++) {
    // Three uploads at different paces; one finishes early so that an analysis is running when
    // the kill comes at a random moment between 0.2 and 1.7 s.
    const files = [0, 1, 2].map((i) =>
      Buffer.from(
        demoCsv(
          { seed: 1000 + t * 10 + i + seed * 100_000, durationS: 10 + 10 * i, sampleRateHz: 2000 },
          { airframe: `HV-0${1 + ((t + i) % 8)}`, flownAt: "2026-11-30T09:00:00Z" },
        ),
      ),
    );
    const uploads = files.map((f, i) =>
      upload(app.url, f, {
        token,
        fileName: `kill-${t}-${i}.csv`,
        chunkBytes: 64 * 1024,
        pauseMs: i === 0 ? 0 : 8 * i,
      }),
    );
    await new Promise((r) => setTimeout(r, 200 + random() * 1500));
    await app.kill();
    for (const a of await Promise.all(uploads)) {
      if (a.status === 200) {
        report.answered200++;
        answered.add(String(a.json().logId));
      }
    }
    const after = integrity(app.dataDir, answered);
    report.lost += after.lost;
    report.integrityFailures.push(...after.problems.map((p) => `trial ${t}: ${p}`));
    const t0 = Date.now();
    app = await startThroughScript(
      app.dataDir,
      { NEXTAUTH_SECRET: String(app.env.NEXTAUTH_SECRET) },
      app.port,
    );
    report.restartMs.push(Date.now() - t0);
    report.leftovers += leftovers(app.dataDir).length;
  }
  report.stuckPending = await waitNoPending(app, 120_000);
  const final = integrity(app.dataDir, answered);
  report.lost = Math.max(report.lost, final.lost);
  report.integrityFailures.push(...final.problems.map((p) => `final: ${p}`));
  return { report, app };
}
