import { spawnSync } from "node:child_process";
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { freshDatabase } from "../support/test-db";

// Issue 7 item 15: a seed that fails half-way keeps nothing, so the next start seeds again.
// The failure is forced the way an operator could cause it: an upload limit below a demo log.
const { dir, url } = freshDatabase("seed");

function filesUnder(path: string): string[] {
  try {
    return readdirSync(path, { recursive: true, withFileTypes: true })
      .filter((e) => e.isFile())
      .map((e) => e.name);
  } catch {
    return [];
  }
}

describe("the demo seed", () => {
  it("is all-or-nothing: a failure leaves no team, no user and no stored file", async () => {
    const r = spawnSync("npx", ["tsx", "--conditions=react-server", "prisma/seed.ts"], {
      env: {
        ...process.env,
        DATABASE_URL: url,
        HEATCHECK_DATA_DIR: dir,
        HEATCHECK_MAX_UPLOAD_MB: "1",
        HEATCHECK_WORKERS: "0",
      },
      encoding: "utf8",
    });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/seed failed: The file is larger than the 1 MiB upload limit/);
    const { db } = await import("@/lib/server/db");
    expect(await db.team.count()).toBe(0);
    expect(await db.user.count()).toBe(0);
    expect(await db.flightLog.count()).toBe(0);
    expect(filesUnder(join(dir, "uploads"))).toEqual([]);
  }, 120_000);
});
