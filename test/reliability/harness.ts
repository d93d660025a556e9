import { execFileSync } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import {
  cpSync,
  existsSync,
  mkdtempSync,
  readFileSync,
  readdirSync,
  renameSync,
  rmSync,
} from "node:fs";
import { request as httpRequest } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { startApp } from "../support/app-server";
import { openSqlite } from "../support/sqlite";

/**
 * The app started the way `npm start` starts it (test/support/app-server.ts runs npm start: migrate,
 * seed the demo team, build when sources changed, next start) with its own data folder, plus
 * the raw HTTP tools the reliability checks need: multipart bodies sent at any pace, cut off at any
 * byte, and an API token written straight into the database.
 */
export interface RunningApp {
  url: string;
  port: number;
  /** The start script's pid, which is also the process group of the app. */
  pid: number;
  dataDir: string;
  env: NodeJS.ProcessEnv;
  output: () => string;
  /** SIGTERM to the whole process group; resolves when it has exited (or after `timeoutMs`, with false). */
  stop: (timeoutMs?: number) => Promise<boolean>;
  /** SIGKILL to the whole process group, no cleanup of any kind. */
  kill: () => Promise<void>;
}

export function newDataDir(label: string): string {
  return mkdtempSync(join(tmpdir(), `heatcheck-${label}-`));
}

/** A hash of everything that shapes the seeded demo database (schema, migrations, seed, lib). */
function seedInputsHash(): string {
  const h = createHash("sha256");
  for (const dir of ["prisma", "lib"]) {
    for (const e of readdirSync(dir, { recursive: true, withFileTypes: true })
      .filter((x) => x.isFile())
      .map((x) => join(x.parentPath, x.name))
      .sort()) {
      h.update(e).update(readFileSync(e));
    }
  }
  return h.digest("hex").slice(0, 16);
}

/**
 * A data folder holding the migrated and seeded demo database, as `npm start` leaves it. Seeding
 * analyses some thirty demo logs (about a minute on the shared 2-core machine), so it is done once
 * per set of sources and copied for each test.
 */
export function seededDataDir(label: string): string {
  const template = join(tmpdir(), `heatcheck-seeded-${seedInputsHash()}`);
  if (!existsSync(template)) {
    const build = mkdtempSync(join(tmpdir(), "heatcheck-seeding-"));
    const env = {
      ...process.env,
      HEATCHECK_DATA_DIR: build,
      DATABASE_URL: `file:${join(build, "heatcheck.db")}`,
      HEATCHECK_WORKERS: "0",
    };
    execFileSync("npx", ["prisma", "migrate", "deploy"], { env, stdio: "pipe" });
    execFileSync("npx", ["tsx", "--conditions=react-server", "prisma/seed.ts"], {
      env,
      stdio: "pipe",
    });
    try {
      renameSync(build, template);
    } catch {
      rmSync(build, { recursive: true, force: true }); // another test file made it first
    }
  }
  const dir = newDataDir(label);
  cpSync(template, dir, { recursive: true });
  return dir;
}

/**
 * Starts the app with `startApp` (npm start, its own process group) on `dataDir`; `port` keeps the
 * address of a previous run (restarts after a kill).
 */
export async function startThroughScript(
  dataDir: string,
  extraEnv: Record<string, string> = {},
  port?: number,
): Promise<RunningApp> {
  const app = await startApp({
    dataDir,
    port,
    env: { HEATCHECK_MAX_UPLOAD_MB: undefined, ...extraEnv },
  });
  const url = new URL(app.url);
  return {
    url: app.url,
    port: Number(url.port),
    pid: app.pid,
    dataDir,
    env: app.env,
    output: app.output,
    stop: async (timeoutMs = 20_000) => {
      try {
        process.kill(-app.pid, "SIGTERM");
      } catch {
        // already gone
      }
      const ok = await app.exited(timeoutMs);
      if (!ok) await app.kill();
      // The group leader exits first; give next-server a moment to follow.
      await new Promise((r) => setTimeout(r, 300));
      return ok;
    },
    kill: async () => {
      await app.kill();
      await new Promise((r) => setTimeout(r, 200));
    },
  };
}

/** Writes an API token for the team of `ownerEmail` into the database and returns it. */
export function addToken(
  dataDir: string,
  ownerEmail = "owner@heatcheck.test",
  name = `t-${randomBytes(3).toString("hex")}`,
): string {
  const db = openSqlite(join(dataDir, "heatcheck.db"));
  try {
    const owner = db
      .prepare(
        `SELECT m."teamId" AS teamId, u.id AS userId FROM "User" u JOIN "Membership" m ON m."userId" = u.id WHERE u.email = ?`,
      )
      .get(ownerEmail);
    if (!owner) throw new Error(`no member ${ownerEmail}`);
    const token = `hc_${randomBytes(24).toString("base64url")}`;
    db.prepare(
      `INSERT INTO "ApiToken" (id, "teamId", name, prefix, "tokenHash", "createdById", "createdAt") VALUES (?, ?, ?, ?, ?, ?, ?)`,
    ).run(
      `tok${randomBytes(8).toString("hex")}`,
      owner.teamId,
      name,
      token.slice(0, 7),
      createHash("sha256").update(token).digest("hex"),
      owner.userId,
      Date.now(),
    );
    return token;
  } finally {
    db.close();
  }
}

export interface Answer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
  json: () => Record<string, unknown>;
}

export interface UploadOptions {
  token: string;
  fileName?: string;
  fields?: Record<string, string>;
  /** Bytes per write and pause between writes, to pace the body. */
  chunkBytes?: number;
  pauseMs?: number;
  /** Destroy the connection after this many bytes of the file part have been sent. */
  cutAfter?: number;
}

const BOUNDARY = "----heatcheck-test-boundary-7d1f";

function multipartParts(
  fields: Record<string, string>,
  fileName: string,
): { head: Buffer; tail: Buffer } {
  let head = "";
  for (const [k, v] of Object.entries(fields))
    head += `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`;
  head += `--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`;
  return { head: Buffer.from(head), tail: Buffer.from(`\r\n--${BOUNDARY}--\r\n`) };
}

/**
 * POST /api/v1/logs with a multipart body written chunk by chunk. Resolves with the answer, or
 * with status 0 when the connection was cut (on purpose, `cutAfter`) or dropped.
 */
export function upload(baseUrl: string, file: Uint8Array, o: UploadOptions): Promise<Answer> {
  const { head, tail } = multipartParts(o.fields ?? {}, o.fileName ?? "log.csv");
  const total = head.length + file.length + tail.length;
  const url = new URL("/api/v1/logs", baseUrl);
  return new Promise((resolve) => {
    let done = false;
    const finish = (a: Answer) => {
      if (!done) {
        done = true;
        resolve(a);
      }
    };
    const req = httpRequest(
      {
        host: url.hostname,
        port: url.port,
        path: url.pathname,
        method: "POST",
        headers: {
          authorization: `Bearer ${o.token}`,
          "content-type": `multipart/form-data; boundary=${BOUNDARY}`,
          "content-length": total,
        },
      },
      (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => {
          const body = Buffer.concat(chunks).toString("utf8");
          finish({
            status: res.statusCode ?? 0,
            headers: res.headers,
            body,
            json: () => JSON.parse(body) as Record<string, unknown>,
          });
        });
        res.on("error", () => finish({ status: 0, headers: {}, body: "", json: () => ({}) }));
      },
    );
    // A server may answer early (413, 422, 429) and close while the body is still being sent:
    // the write then fails, but the answer may still arrive, so wait a moment for it.
    req.on("error", () =>
      setTimeout(() => finish({ status: 0, headers: {}, body: "", json: () => ({}) }), 500),
    );
    const chunk = o.chunkBytes ?? 1 << 20;
    const write = async () => {
      req.write(head);
      for (let i = 0; i < file.length && !done; i += chunk) {
        const end = Math.min(file.length, i + chunk);
        if (o.cutAfter !== undefined && end >= o.cutAfter) {
          req.write(file.subarray(i, o.cutAfter));
          await new Promise((r) => setTimeout(r, 50));
          req.destroy();
          finish({ status: 0, headers: {}, body: "", json: () => ({}) });
          return;
        }
        if (!req.write(file.subarray(i, end))) await new Promise((r) => req.once("drain", r));
        if (o.pauseMs) await new Promise((r) => setTimeout(r, o.pauseMs));
      }
      if (!done) req.end(tail);
    };
    void write();
  });
}

export async function getJson(
  baseUrl: string,
  path: string,
  token: string,
): Promise<{ status: number; body: Record<string, unknown> | unknown[] }> {
  const r = await fetch(new URL(path, baseUrl), { headers: { authorization: `Bearer ${token}` } });
  return { status: r.status, body: (await r.json()) as Record<string, unknown> };
}

/** Every file under a folder, relative to it. */
export function filesUnder(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => join(e.parentPath, e.name).slice(dir.length + 1));
}

/** Waits until a log is no longer pending (or the deadline passes) and returns its status body. */
export async function settled(
  baseUrl: string,
  logId: string,
  token: string,
  timeoutMs = 60_000,
): Promise<Record<string, unknown>> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const r = await getJson(baseUrl, `/api/v1/logs/${logId}`, token);
    const body = r.body as Record<string, unknown>;
    if (body.status !== "pending" || Date.now() > deadline) return body;
    await new Promise((res) => setTimeout(res, 250));
  }
}
