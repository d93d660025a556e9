import { execFileSync } from "node:child_process";
import { closeSync, cpSync, mkdtempSync, openSync, rmSync, statfsSync, writeSync } from "node:fs";
import { request as httpRequest } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import { openSqlite } from "../support/sqlite";
import {
  addToken,
  filesUnder,
  getJson,
  seededDataDir,
  startThroughScript,
  upload,
  type RunningApp,
} from "./harness";

// A full disk, made real: the data folder lives on a size-limited tmpfs (mount -t tmpfs -o size=,
// Linux; needs root, skipped otherwise) and is filled with a filler file until writes fail with
// ENOSPC. Expected behaviour from HTTP (RFC 4918 §11.5: 507 Insufficient Storage) and the
// README's promise that a refused upload keeps nothing; reads must not need a write.

const mount = mkdtempSync(join(tmpdir(), "heatcheck-full-"));
let mounted = false;
let app: RunningApp;
let token: string;
const fillers: string[] = [];

function canMount(): boolean {
  if (process.getuid?.() !== 0) return false;
  try {
    execFileSync("mount", ["-t", "tmpfs", "-o", "size=1m", "tmpfs", mount]);
    execFileSync("umount", [mount]);
    return true;
  } catch {
    return false;
  }
}
const root = canMount();

function freeBytes(): number {
  const s = statfsSync(mount);
  return s.bavail * s.bsize;
}

/** Writes a filler file until only `leave` bytes are free (0: until the disk refuses). */
function fill(leave: number): void {
  const path = join(mount, `filler-${fillers.length}`);
  fillers.push(path);
  const fd = openSync(path, "w");
  const big = Buffer.alloc(1 << 20, 0x61);
  const small = Buffer.alloc(4096, 0x61);
  try {
    while (freeBytes() - big.length > leave) writeSync(fd, big);
    while (freeBytes() > leave) writeSync(fd, small);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== "ENOSPC") throw e;
  } finally {
    closeSync(fd);
  }
}

function unfill(): void {
  for (const f of fillers.splice(0)) rmSync(f, { force: true });
}

function logCount(dataDir: string): number {
  const db = openSqlite(join(dataDir, "heatcheck.db"), true);
  try {
    return Number(db.prepare(`SELECT count(*) AS n FROM "FlightLog"`).get()?.n ?? -1);
  } finally {
    db.close();
  }
}

beforeAll(async () => {
  if (!root) return;
  const seeded = seededDataDir("disk-full-src");
  const used = Number(execFileSync("du", ["-sb", seeded]).toString().split("\t")[0]);
  execFileSync("mount", [
    "-t",
    "tmpfs",
    "-o",
    `size=${Math.ceil((used + 48e6) / 1e6)}m,mode=0700`,
    "tmpfs",
    mount,
  ]);
  mounted = true;
  const dataDir = join(mount, "data");
  cpSync(seeded, dataDir, { recursive: true });
  rmSync(seeded, { recursive: true, force: true });
  app = await startThroughScript(dataDir, { HEATCHECK_SHUTDOWN_S: "3" });
  token = addToken(dataDir);
}, 300_000);

afterAll(async () => {
  unfill();
  await app?.stop();
  // The server's last process may still hold the database for a moment after the group leader
  // exits: try a few times, then detach the mount lazily so nothing is left mounted.
  for (let i = 0; mounted && i < 20; i++) {
    try {
      execFileSync("umount", [mount]);
      mounted = false;
    } catch {
      await new Promise((r) => setTimeout(r, 250));
    }
  }
  if (mounted) execFileSync("umount", ["-l", mount]);
  rmSync(mount, { recursive: true, force: true });
});

describe.skipIf(!root)("disk full", () => {
  it("an upload that does not fit: 507 with a sentence, the partial file removed, nothing recorded", async () => {
    const before = logCount(app.dataDir);
    fill(6e6);
    const bytes = Buffer.from(
      demoCsv({ seed: 901, durationS: 60, sampleRateHz: 4000 }, { airframe: "HV-03" }),
    );
    expect(bytes.length).toBeGreaterThan(12e6);
    const r = await upload(app.url, bytes, { token, fileName: "hv-03-too-big-for-disk.csv" });
    expect(r.status).toBe(507);
    expect(String(r.json().error)).toMatch(/disk is full/);
    expect(filesUnder(join(app.dataDir, "uploads")).filter((f) => f.includes("incoming-"))).toEqual(
      [],
    );
    expect(logCount(app.dataDir)).toBe(before);
  });

  it("while the disk is full, token reads still answer", async () => {
    fill(0);
    expect(freeBytes()).toBeLessThan(64 * 1024);
    const q = await getJson(app.url, "/api/v1/queue", token);
    expect(q.status).toBe(200);
    expect(Array.isArray(q.body)).toBe(true);
    const a = await getJson(app.url, "/api/v1/airframes/HV-03", token);
    expect(a.status).toBe(200);
    unfill();
  });

  it("an analysis whose result cannot be stored waits visibly and is stored once space is back", async () => {
    const bytes = Buffer.from(
      demoCsv({ seed: 902, durationS: 40, sampleRateHz: 4000 }, { airframe: "HV-03" }),
    );
    const r = await upload(app.url, bytes, { token, fileName: "hv-03-then-full.csv" });
    expect(r.status).toBe(200);
    fill(0);
    const id = String(r.json().logId);
    let sawNote = false;
    let status = "pending";
    const deadline = Date.now() + 20_000;
    while (Date.now() < deadline) {
      const s = (await getJson(app.url, `/api/v1/logs/${id}`, token)).body as Record<
        string,
        unknown
      >;
      status = String(s.status);
      if (typeof s.note === "string" && /disk is full/.test(s.note)) sawNote = true;
      if (status !== "pending" || sawNote) break;
      await new Promise((res) => setTimeout(res, 200));
    }
    unfill();
    // Either the analysis finished before the disk filled, or it waited and said why.
    expect(status === "analysed" || sawNote).toBe(true);
    const end = Date.now() + 60_000;
    while (status === "pending" && Date.now() < end) {
      await new Promise((res) => setTimeout(res, 500));
      status = String(
        ((await getJson(app.url, `/api/v1/logs/${id}`, token)).body as Record<string, unknown>)
          .status,
      );
    }
    expect(status).toBe("analysed");
  }, 120_000);

  it("SIGTERM with an upload hanging open: the server is gone within the grace period", async () => {
    const url = new URL("/api/v1/logs", app.url);
    const req = httpRequest({
      host: url.hostname,
      port: url.port,
      path: url.pathname,
      method: "POST",
      headers: {
        authorization: `Bearer ${token}`,
        "content-type": "multipart/form-data; boundary=x",
        "content-length": 1e9,
      },
    });
    req.on("error", () => undefined);
    req.write(
      '--x\r\nContent-Disposition: form-data; name="file"; filename="hv-03-hang.csv"\r\n\r\n# airframe: HV-03\n',
    );
    await new Promise((r) => setTimeout(r, 500));
    const t0 = Date.now();
    const exited = await app.stop(10_000);
    expect(exited).toBe(true);
    expect(Date.now() - t0).toBeLessThan(8_000); // 3 s grace (HEATCHECK_SHUTDOWN_S) plus start-up of the exit
    req.destroy();
    // the interrupted upload's temporary is swept at the next start
    app = await startThroughScript(
      app.dataDir,
      { HEATCHECK_SHUTDOWN_S: "3", NEXTAUTH_SECRET: String(app.env.NEXTAUTH_SECRET) },
      app.port,
    );
    expect(filesUnder(join(app.dataDir, "uploads")).filter((f) => f.includes("incoming-"))).toEqual(
      [],
    );
  }, 120_000);
});
