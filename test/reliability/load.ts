import { readFileSync, readdirSync } from "node:fs";
import { request as httpRequest } from "node:http";
import { join } from "node:path";
import { demoCsv } from "@/lib/demo/demo-csv";
import { HttpSession } from "../support/http-session";
import { openSqlite } from "../support/sqlite";
import { addToken, upload, type RunningApp } from "./harness";

/**
 * A bounded loopback load run: `readers` clients read the inspection queue (API, bearer token)
 * and the home page (signed-in session) back to back, while `uploaders` clients, each with its own
 * API token as a pit laptop would have, upload logs of `uploadMb` one after another. Every request
 * is timed; at the end every upload answered 200 is looked up in the database.
 */
export interface LoadOptions {
  readers: number;
  uploaders: number;
  seconds: number;
  uploadMb: number;
}

export interface Stats {
  count: number;
  p50: number;
  p95: number;
  p99: number;
  max: number;
}

export interface LoadReport {
  options: LoadOptions;
  requests: number;
  errors: number;
  errorSamples: string[];
  queueMs: Stats;
  homeMs: Stats;
  uploadMs: Stats;
  /** Per-upload throughput (file bytes / request time), MB/s. */
  uploadMBps: { p5: number; median: number; min: number };
  uploads: number;
  /** Uploads told to come back later (429 or 503 with Retry-After); each waited and tried again. */
  refused: number;
  lostUploads: number;
  maxRssMb: number;
}

export function stats(values: readonly number[]): Stats {
  const s = [...values].sort((a, b) => a - b);
  const at = (q: number) =>
    s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))] ?? Number.NaN;
  return {
    count: s.length,
    p50: at(0.5),
    p95: at(0.95),
    p99: at(0.99),
    max: s[s.length - 1] ?? Number.NaN,
  };
}

function get(
  baseUrl: string,
  path: string,
  headers: Record<string, string>,
): Promise<{ status: number; ms: number }> {
  const url = new URL(path, baseUrl);
  const t0 = performance.now();
  return new Promise((resolve) => {
    // A new connection per request (no keep-alive): a reused socket the server is just closing
    // would count as an error of the client's making.
    const req = httpRequest(
      {
        host: url.hostname,
        port: url.port,
        path: url.pathname + url.search,
        headers,
        agent: false,
      },
      (res) => {
        res.resume();
        res.on("end", () => resolve({ status: res.statusCode ?? 0, ms: performance.now() - t0 }));
        res.on("error", () => resolve({ status: 0, ms: performance.now() - t0 }));
      },
    );
    req.on("error", () => resolve({ status: 0, ms: performance.now() - t0 }));
    req.end();
  });
}

/** Largest resident set of one process in the app's process group, MB (Linux /proc). */
export function maxRssOfGroup(groupPid: number): number {
  let max = 0;
  for (const pid of readdirSync("/proc").filter((p) => /^\d+$/.test(p))) {
    try {
      const stat = readFileSync(join("/proc", pid, "stat"), "utf8");
      const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      if (Number(fields[2]) !== groupPid) continue;
      const rss = /VmRSS:\s+(\d+) kB/.exec(readFileSync(join("/proc", pid, "status"), "utf8"));
      max = Math.max(max, Number(rss?.[1] ?? 0) / 1024);
    } catch {
      // the process ended meanwhile
    }
  }
  return max;
}

export async function runLoad(
  app: RunningApp,
  groupPid: number,
  o: LoadOptions,
): Promise<LoadReport> {
  const readToken = addToken(app.dataDir, "owner@heatcheck.test", "load readers");
  const session = new HttpSession(app.url);
  if (!(await session.signIn("viewer@heatcheck.test", "pitwall-viewer-2026")))
    throw new Error("the demo viewer could not sign in");
  const cookie = session.cookieHeader;
  const base = Buffer.from(
    demoCsv(
      { seed: 5150, durationS: Math.max(3, (o.uploadMb * 1e6) / (4000 * 64)), sampleRateHz: 4000 },
      { airframe: "HV-06", flownAt: "2026-11-30T11:00:00Z" },
    ),
  );
  const tokens = Array.from({ length: o.uploaders }, (_, i) =>
    addToken(app.dataDir, "owner@heatcheck.test", `load uploader ${i}`),
  );
  const end = Date.now() + o.seconds * 1000;
  const queueMs: number[] = [];
  const homeMs: number[] = [];
  const uploadMs: number[] = [];
  const mbps: number[] = [];
  const answered: string[] = [];
  const errorSamples: string[] = [];
  let errors = 0;
  let refused = 0;
  let rss = 0;
  const sampler = setInterval(() => (rss = Math.max(rss, maxRssOfGroup(groupPid))), 500);
  const fail = (what: string) => {
    errors++;
    if (errorSamples.length < 10) errorSamples.push(what);
  };
  const reader = async (i: number) => {
    for (let n = 0; Date.now() < end; n++) {
      if ((n + i) % 2 === 0) {
        const r = await get(app.url, "/api/v1/queue", { authorization: `Bearer ${readToken}` });
        queueMs.push(r.ms);
        if (r.status !== 200) fail(`queue ${r.status}`);
      } else {
        const r = await get(app.url, "/", { cookie });
        homeMs.push(r.ms);
        if (r.status !== 200) fail(`home ${r.status}`);
      }
    }
  };
  const uploader = async (i: number) => {
    for (let n = 0; Date.now() < end; n++) {
      const bytes = Buffer.concat([
        Buffer.from(`# note: load run uploader ${i} upload ${n} ${Date.now()}\n`),
        base,
      ]);
      const t0 = performance.now();
      const r = await upload(app.url, bytes, {
        token: tokens[i] ?? "",
        fileName: `hv-06-load-${i}-${n}.csv`,
        chunkBytes: 256 * 1024,
      });
      const ms = performance.now() - t0;
      if (r.status === 200) {
        uploadMs.push(ms);
        mbps.push(bytes.length / 1e6 / (ms / 1000));
        answered.push(String(r.json().logId));
      } else if (r.status === 429 || r.status === 503) {
        // Told to come back: wait as asked, jittered as the upload page does.
        refused++;
        const waitS = Number(r.headers["retry-after"] ?? 1) * (1 + Math.random() * 0.5);
        await new Promise((res) => setTimeout(res, 1000 * waitS));
      } else fail(`upload ${r.status} ${r.body.slice(0, 120)}`);
    }
  };
  await Promise.all([
    ...Array.from({ length: o.readers }, (_, i) => reader(i)),
    ...Array.from({ length: o.uploaders }, (_, i) => uploader(i)),
  ]);
  clearInterval(sampler);
  const db = openSqlite(join(app.dataDir, "heatcheck.db"), true);
  const have = new Set(
    db
      .prepare(`SELECT id FROM "FlightLog"`)
      .all()
      .map((r) => String(r.id)),
  );
  db.close();
  const sortedMbps = [...mbps].sort((a, b) => a - b);
  return {
    options: o,
    requests: queueMs.length + homeMs.length + uploadMs.length + refused + errors,
    errors,
    errorSamples,
    queueMs: stats(queueMs),
    homeMs: stats(homeMs),
    uploadMs: stats(uploadMs),
    uploadMBps: {
      p5: sortedMbps[Math.floor(0.05 * sortedMbps.length)] ?? Number.NaN,
      median: sortedMbps[Math.floor(0.5 * sortedMbps.length)] ?? Number.NaN,
      min: sortedMbps[0] ?? Number.NaN,
    },
    uploads: answered.length,
    refused,
    lostUploads: answered.filter((id) => !have.has(id)).length,
    maxRssMb: Math.round(rss),
  };
}
