import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { createReadStream, existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { createGunzip } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readTar } from "@/lib/archive/tar";
import { demoCsv } from "@/lib/demo/demo-csv";
import { openSqlite } from "../support/sqlite";
import {
  addToken,
  seededDataDir,
  getJson,
  newDataDir,
  settled,
  startThroughScript,
  upload,
  type RunningApp,
} from "./harness";

// Data safety: a backup taken while the server runs restores into an empty folder and serves the
// same demo team (same records, same queue, originals whose SHA-256 still matches the recorded
// hash — FIPS 180-4 via node:crypto); a team export is a plain ustar archive that Debian's GNU tar
// lists (an outside reader of the POSIX format), holding every record and every original.

const run = promisify(execFile);
let app: RunningApp;
let token: string;
const work = mkdtempSync(join(tmpdir(), "heatcheck-backup-test-"));
const made: string[] = [work];

function tableCounts(dbFile: string): Record<string, number> {
  const db = openSqlite(dbFile, true);
  try {
    const out: Record<string, number> = {};
    for (const t of [
      "Team",
      "User",
      "Membership",
      "Airframe",
      "Part",
      "Installation",
      "Crash",
      "Inspection",
      "FlightLog",
      "Analysis",
      "Baseline",
      "Assessment",
      "AuditEntry",
    ]) {
      out[t] = Number(db.prepare(`SELECT count(*) AS n FROM "${t}"`).get()?.n ?? -1);
    }
    return out;
  } finally {
    db.close();
  }
}

function sha256(path: string): string {
  return createHash("sha256").update(readFileSync(path)).digest("hex");
}

beforeAll(async () => {
  app = await startThroughScript(seededDataDir("backup-src"));
  token = addToken(app.dataDir);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  if (app) rmSync(app.dataDir, { recursive: true, force: true });
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

describe("backup and restore", () => {
  it("a backup taken during an upload restores into an empty folder with the same records, queue and originals", async () => {
    const archive = join(work, "backup.tar.gz");
    const bytes = Buffer.from(
      demoCsv(
        { seed: 77, durationS: 20, sampleRateHz: 2000 },
        { airframe: "HV-04", flownAt: "2026-11-30T12:00:00Z" },
      ),
    );
    // The backup runs while the server takes an upload and analyses it.
    const [up, backup] = await Promise.all([
      upload(app.url, bytes, {
        token,
        fileName: "hv-04-during-backup.csv",
        chunkBytes: 64 * 1024,
        pauseMs: 5,
      }),
      run("npm", ["run", "-s", "backup", "--", archive], { env: app.env }),
    ]);
    expect(up.status).toBe(200);
    expect(backup.stdout).toMatch(/backup written/);
    await settled(app.url, String(up.json().logId), token);
    const queueBefore = await getJson(app.url, "/api/v1/queue", token);

    // A second backup after the upload settled is the one compared record for record.
    const archive2 = join(work, "backup2.tar.gz");
    await run("npm", ["run", "-s", "backup", "--", archive2], { env: app.env });
    const countsBefore = tableCounts(join(app.dataDir, "heatcheck.db"));

    const target = newDataDir("backup-dst");
    made.push(target);
    const env = {
      ...app.env,
      HEATCHECK_DATA_DIR: target,
      DATABASE_URL: `file:${join(target, "heatcheck.db")}`,
    };
    const restored = await run("npm", ["run", "-s", "restore", "--", archive2], { env });
    expect(restored.stdout).toMatch(/restored/);
    // restoring again into the now full folder is refused and changes nothing
    await expect(
      run("npm", ["run", "-s", "restore", "--", archive2], { env }),
    ).rejects.toMatchObject({ code: 1 });

    expect(tableCounts(join(target, "heatcheck.db"))).toEqual(countsBefore);
    const db = openSqlite(join(target, "heatcheck.db"), true);
    const logs = db.prepare(`SELECT "storedPath" AS p, "contentHash" AS h FROM "FlightLog"`).all();
    expect(db.pragma("integrity_check", { simple: true })).toBe("ok");
    db.close();
    expect(logs.length).toBeGreaterThan(0);
    for (const l of logs) {
      expect(String(l.p).startsWith("/")).toBe(false);
      expect(sha256(join(target, String(l.p)))).toBe(l.h);
    }

    // The first archive (taken mid-upload) is consistent too: every log it records has its original.
    const mid = newDataDir("backup-mid");
    made.push(mid);
    await run("npm", ["run", "-s", "restore", "--", archive], {
      env: {
        ...app.env,
        HEATCHECK_DATA_DIR: mid,
        DATABASE_URL: `file:${join(mid, "heatcheck.db")}`,
      },
    });
    const mdb = openSqlite(join(mid, "heatcheck.db"), true);
    for (const l of mdb
      .prepare(`SELECT "storedPath" AS p, "contentHash" AS h FROM "FlightLog"`)
      .all())
      expect(sha256(join(mid, String(l.p)))).toBe(l.h);
    mdb.close();

    await app.stop();
    const again = await startThroughScript(target, {
      NEXTAUTH_SECRET: String(app.env.NEXTAUTH_SECRET),
    });
    try {
      const queueAfter = await getJson(again.url, "/api/v1/queue", token);
      expect(queueAfter).toEqual(queueBefore);
    } finally {
      await again.stop();
    }
    app = await startThroughScript(
      app.dataDir,
      { NEXTAUTH_SECRET: String(app.env.NEXTAUTH_SECRET) },
      app.port,
    );
  }, 300_000);
});

describe("team export", () => {
  it("is a ustar archive with every record of the team and every original byte for byte", async () => {
    const archive = join(work, "team.tar.gz");
    const r = await run(
      "npm",
      ["run", "-s", "export-team", "--", "Harrow Vale Quad Club", archive],
      { env: app.env },
    );
    expect(r.stdout).toMatch(/exported/);
    const listing = (await run("tar", ["-tzf", archive])).stdout.split("\n").filter(Boolean);
    expect(listing).toContain("team.json");
    expect(listing).toContain("csv/airframes.csv");
    const files = new Map<string, Buffer>();
    await readTar(createReadStream(archive).pipe(createGunzip()), async (entry, body) => {
      const parts: Buffer[] = [];
      for await (const c of body) parts.push(Buffer.from(c));
      files.set(entry.name, Buffer.concat(parts));
    });
    const doc = JSON.parse(files.get("team.json")?.toString("utf8") ?? "{}") as {
      format: string;
      airframes: unknown[];
      logs: { id: string; contentHash: string }[];
      members: Record<string, unknown>[];
    };
    expect(doc.format).toBe("heatcheck-team-export");
    const counts = tableCounts(join(app.dataDir, "heatcheck.db"));
    expect(doc.airframes.length).toBe(counts.Airframe);
    expect(doc.logs.length).toBe(counts.FlightLog);
    for (const l of doc.logs) {
      const original = files.get(`originals/${l.id}.csv`);
      expect(original && createHash("sha256").update(original).digest("hex")).toBe(l.contentHash);
    }
    expect(JSON.stringify(doc.members)).not.toMatch(/passwordHash|\$2[aby]\$/);
    // the CSV header row of the airframes table plus one row per airframe
    expect(
      (files.get("csv/airframes.csv")?.toString("utf8") ?? "").trim().split("\r\n").length,
    ).toBe((counts.Airframe ?? 0) + 1);
    expect(existsSync(archive)).toBe(true);
  }, 120_000);
});
