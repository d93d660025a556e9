import { createHash } from "node:crypto";
import { statSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import { openSqlite } from "../support/sqlite";
import {
  addToken,
  seededDataDir,
  filesUnder,
  settled,
  startThroughScript,
  upload,
  type RunningApp,
} from "./harness";

// Uploads against the running app, started the way npm start starts it. What is checked comes from
// the README's promises ("rejected with the line, column and what was expected … nothing is
// half-imported"), HTTP semantics (RFC 9110: 413 content too large, 422 unprocessable content,
// 429 too many requests with Retry-After per RFC 6585, 503 with Retry-After when the server is
// busy per RFC 9110 §15.6.4) and common practice for a multi-user server
// (private files 0600, folders 0700).

let app: RunningApp;
let token: string;
const SERVER_WIDE = 6;

const good = (seed: number, meta: Record<string, string> = {}) =>
  Buffer.from(
    demoCsv(
      { seed, durationS: 12, sampleRateHz: 2000 },
      { airframe: "HV-05", flownAt: "2026-11-30T10:00:00Z", ...meta },
    ),
  );

function counts(): { logs: number; files: string[] } {
  const db = openSqlite(join(app.dataDir, "heatcheck.db"), true);
  try {
    const row = db.prepare(`SELECT count(*) AS n FROM "FlightLog"`).get();
    return { logs: Number(row?.n ?? -1), files: filesUnder(join(app.dataDir, "uploads")).sort() };
  } finally {
    db.close();
  }
}

beforeAll(async () => {
  // Six at once server-wide, so the per-caller limit (4) is what the tests below meet first.
  app = await startThroughScript(seededDataDir("upload-api"), {
    HEATCHECK_MAX_UPLOAD_MB: "16",
    HEATCHECK_UPLOADS_AT_ONCE: String(SERVER_WIDE),
  });
  token = addToken(app.dataDir);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  if (app) rmSync(app.dataDir, { recursive: true, force: true });
});

describe("bad content is refused while it streams, and nothing is kept", () => {
  const header = "time_us,gyro_roll,gyro_pitch,gyro_yaw,throttle";
  const cases: { name: string; body: string; status: number; message: RegExp }[] = [
    {
      name: "a letter in a gyro cell",
      body: `# airframe: HV-05\n${header}\n0,1,2,3,0.5\n500,1,x2,3,0.5\n`,
      status: 422,
      message: /line 4, column 3/,
    },
    {
      name: "time going backwards",
      body: `# airframe: HV-05\n${header}\n0,1,2,3,0.5\n500,1,2,3,0.5\n1000,1,2,3,0.5\n400,1,2,3,0.5\n`,
      status: 422,
      message: /line 6/,
    },
    {
      name: "no gyro columns",
      body: `# airframe: HV-05\ntime_us,speed\n0,1\n500,2\n`,
      status: 422,
      message: /roll/,
    },
    { name: "an empty file", body: "", status: 422, message: /empty/ },
    {
      name: "too short for one analysis segment",
      body: good(2).toString("utf8").slice(0, 4000),
      status: 422,
      message: /one analysis segment needs/,
    },
    {
      name: "a flight dated in the year 10000",
      body: good(3, { flownAt: "10000-01-01T00:00:00Z" }).toString("utf8"),
      status: 422,
      message: /flown_at/,
    },
  ];
  for (const c of cases) {
    it(`${c.name}: ${c.status}, with the place and the reason`, async () => {
      const before = counts();
      const r = await upload(app.url, Buffer.from(c.body), { token, fileName: "hv-05-bad.csv" });
      expect(r.status).toBe(c.status);
      expect(String(r.json().error)).toMatch(c.message);
      expect(counts()).toEqual(before);
    });
  }

  it("a file over the limit stops at the limit: 413, nothing kept", async () => {
    const before = counts();
    const big = Buffer.from(
      demoCsv({ seed: 4, durationS: 200, sampleRateHz: 4000 }, { airframe: "HV-05" }),
    );
    expect(big.length).toBeGreaterThan(16 * 1024 * 1024);
    const r = await upload(app.url, big, { token, fileName: "hv-05-big.csv" });
    expect(r.status).toBe(413);
    expect(counts()).toEqual(before);
  });
});

describe("good uploads", () => {
  // Larger than the 10 MB to which Next cuts a request body it clones for the proxy
  // (experimental.proxyClientMaxBodySize, Next.js docs): the upload route must get every byte.
  it("a 12 MB log arrives whole: the stored original has every byte and is analysed", async () => {
    const bytes = Buffer.from(
      demoCsv({ seed: 51, durationS: 60, sampleRateHz: 4000 }, { airframe: "HV-05" }),
    );
    expect(bytes.length).toBeGreaterThan(12e6);
    const r = await upload(app.url, bytes, { token, fileName: "hv-05-twelve-mb.csv" });
    expect(r.status).toBe(200);
    const sha = createHash("sha256").update(bytes).digest("hex");
    const stored = filesUnder(join(app.dataDir, "uploads")).find((f) => f.includes(sha));
    expect(stored).toBeDefined();
    expect(statSync(join(app.dataDir, "uploads", stored ?? "")).size).toBe(bytes.length);
    const status = await settled(app.url, String(r.json().logId), token, 120_000);
    expect(status.status).toBe("analysed");
  });

  it("six parallel uploads of the same new bytes all get the one log, five marked duplicate", async () => {
    const before = counts();
    const bytes = good(21);
    const answers = await Promise.all(
      Array.from({ length: 6 }, () =>
        upload(app.url, bytes, { token, fileName: "hv-05-same.csv", chunkBytes: 64 * 1024 }),
      ),
    );
    // The per-caller limit (4 at once) may refuse some with 429; the rest share one log.
    const ok = answers.filter((a) => a.status === 200).map((a) => a.json());
    const refused = answers.filter((a) => a.status === 429);
    expect(ok.length + refused.length).toBe(6);
    expect(new Set(ok.map((a) => a.logId)).size).toBe(1);
    expect(ok.filter((a) => a.duplicate === false).length).toBe(1);
    expect(counts().logs).toBe(before.logs + 1);
    const logId = String(ok[0]?.logId);
    const status = await settled(app.url, logId, token);
    expect(status.status).toBe("analysed");
  });

  it("the original is stored private (0600) in private folders (0700), as is the database", () => {
    const db = join(app.dataDir, "heatcheck.db");
    expect(statSync(db).mode & 0o777).toBe(0o600);
    expect(statSync(app.dataDir).mode & 0o777).toBe(0o700);
    const uploads = join(app.dataDir, "uploads");
    expect(statSync(uploads).mode & 0o777).toBe(0o700);
    for (const f of filesUnder(uploads)) {
      expect(statSync(join(uploads, f)).mode & 0o777).toBe(0o600);
      const parent = join(uploads, f, "..");
      expect(statSync(parent).mode & 0o777).toBe(0o700);
    }
  });
});

/** Uploads whose bodies trickle in (16 KiB every 150 ms), so that they hold their slots a while. */
function slowUploads(seeds: number[], tokenFor: (i: number) => string, fileName: string) {
  return seeds.map((seed, i) =>
    upload(app.url, good(seed), {
      token: tokenFor(i),
      fileName,
      chunkBytes: 16 * 1024,
      pauseMs: 150,
    }),
  );
}

/**
 * Uploads streaming now, once `n` are (each running upload has its temporary file) or after 60 s.
 */
async function streamingWhen(n: number): Promise<number> {
  const streaming = () =>
    filesUnder(join(app.dataDir, "uploads")).filter((f) => f.includes("incoming-")).length;
  const deadline = Date.now() + 60_000;
  while (streaming() < n && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
  return streaming();
}

describe("aborted and excess uploads", () => {
  it("an upload cut off mid-body leaves no temporary file, no record and no uncaught exception", async () => {
    const before = counts();
    const bytes = good(31);
    for (const cut of [10, 70_000, Math.floor(bytes.length / 2)]) {
      const r = await upload(app.url, bytes, {
        token,
        fileName: "hv-05-cut.csv",
        chunkBytes: 16 * 1024,
        cutAfter: cut,
      });
      expect(r.status).toBe(0);
    }
    // The server notices the dropped socket asynchronously.
    const deadline = Date.now() + 5000;
    while (Date.now() < deadline && JSON.stringify(counts()) !== JSON.stringify(before))
      await new Promise((r) => setTimeout(r, 100));
    expect(counts()).toEqual(before);
    expect(app.output()).not.toMatch(/uncaughtException|unhandledRejection/);
    // and it still answers
    const ok = await upload(app.url, good(32), { token, fileName: "hv-05-after-cut.csv" });
    expect(ok.status).toBe(200);
  });

  it("a fifth upload at once from one token is refused with 429 and Retry-After; the others go through", async () => {
    // Four slow uploads hold their slots (the body trickles in), the fifth arrives meanwhile.
    const slow = slowUploads([41, 42, 43, 44], () => token, "hv-05-slow.csv");
    // On a loaded machine the four may take long to start; the check means nothing until they have.
    expect(await streamingWhen(4)).toBe(4);
    const fifth = await upload(app.url, good(45), {
      token,
      fileName: "hv-05-fifth.csv",
    });
    expect(fifth.status).toBe(429);
    expect(Number(fifth.headers["retry-after"])).toBeGreaterThan(0);
    expect(String(fifth.json().error)).toMatch(/uploads running/);
    const rest = await Promise.all(slow);
    expect(rest.map((r) => r.status)).toEqual([200, 200, 200, 200]);
    // another token of the same team is not held up by the first one's uploads
    const other = addToken(app.dataDir);
    expect(
      (await upload(app.url, good(46), { token: other, fileName: "hv-05-other.csv" })).status,
    ).toBe(200);
  });

  it("past the server-wide limit an upload is told to come back (503, Retry-After) and nothing is kept", async () => {
    const before = counts();
    // Two tokens, three slow uploads each: six streaming, the server's limit, and under each
    // caller's own limit of four.
    const tokens = [addToken(app.dataDir), addToken(app.dataDir)];
    const slow = slowUploads(
      [51, 52, 53, 54, 55, 56],
      (i) => tokens[i % 2] ?? "",
      "hv-05-busy.csv",
    );
    expect(await streamingWhen(SERVER_WIDE)).toBe(SERVER_WIDE);
    const third = addToken(app.dataDir);
    const busy = await upload(app.url, good(57), { token: third, fileName: "hv-05-busy-7.csv" });
    expect(busy.status).toBe(503);
    expect(Number(busy.headers["retry-after"])).toBeGreaterThan(0);
    expect(String(busy.json().error)).toMatch(/try again in a moment/);
    expect((await Promise.all(slow)).map((r) => r.status)).toEqual(Array(6).fill(200));
    expect(counts().logs).toBe(before.logs + 6);
    // once they are done, the same file goes through
    const again = await upload(app.url, good(57), { token: third, fileName: "hv-05-busy-7.csv" });
    expect(again.status).toBe(200);
  });
});
