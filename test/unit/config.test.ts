import { readFileSync } from "node:fs";
import { availableParallelism } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { CONFIG_VARIABLES, config } from "@/lib/config";
import { ConfigError } from "@/lib/errors";

// lib/config.ts against the README's settings table (the user's documentation of the same
// variables and defaults) and against the rules it states for bad values.

const readme = readFileSync(join(process.cwd(), "README.md"), "utf8");
const documented = [...readme.matchAll(/^\| `([A-Z_]+)` \|/gm)].map((m) => m[1]);

describe("config", () => {
  it("reads every variable of the README's settings table", () => {
    expect(documented.length).toBeGreaterThanOrEqual(13);
    for (const name of documented) expect(CONFIG_VARIABLES, name).toContain(name);
  });

  it("has the README's defaults when nothing is set", () => {
    const c = config({});
    expect(c.port).toBe(3000);
    expect(c.host).toBe("127.0.0.1");
    expect(c.dataDir).toBe(join(process.cwd(), "data"));
    expect(c.databaseUrl).toBe(`file:${join(process.cwd(), "data", "heatcheck.db")}`);
    expect(c.publicUrl).toBe("http://localhost:3000");
    expect(c.maxUploadBytes).toBe(512 * 1024 * 1024);
    expect(c.workers).toBe(Math.max(1, availableParallelism() - 1));
    expect(c.uploadsPerCaller).toBe(4);
    expect(c.queuedPerTeam).toBe(200);
    expect(c.shutdownGraceS).toBe(10);
    expect(c.demo).toBe(true);
    expect(c.trustProxy).toBe(false);
  });

  it("derives the database and the public address from the data folder and the port", () => {
    const c = config({ HEATCHECK_DATA_DIR: "/srv/pits", PORT: "8080" });
    expect(c.databaseUrl).toBe("file:/srv/pits/heatcheck.db");
    expect(c.publicUrl).toBe("http://localhost:8080");
    expect(config({ DATABASE_URL: "file:/x.db", HEATCHECK_DATA_DIR: "/srv" }).databaseUrl).toBe(
      "file:/x.db",
    );
  });

  it("turns demo mode off only with 0 and trusts a proxy only with 1 (README)", () => {
    expect(config({ HEATCHECK_DEMO: "0" }).demo).toBe(false);
    expect(config({ HEATCHECK_DEMO: "1" }).demo).toBe(true);
    expect(config({ HEATCHECK_TRUST_PROXY: "1" }).trustProxy).toBe(true);
    expect(config({ HEATCHECK_TRUST_PROXY: "yes" }).trustProxy).toBe(false);
    expect(config({ HEATCHECK_WORKERS: "0" }).workers).toBe(0);
    expect(config({ HEATCHECK_MAX_UPLOAD_MB: "0.5" }).maxUploadBytes).toBe(512 * 1024);
  });

  it("treats an empty value as unset", () => {
    expect(config({ PORT: "", HEATCHECK_MAX_UPLOAD_MB: "" }).port).toBe(3000);
  });

  it("refuses a value that does not parse with one sentence naming the variable", () => {
    const cases: [Record<string, string>, RegExp][] = [
      [{ PORT: "80a" }, /^PORT must be a TCP port, 1–65535; it is set to "80a"\.$/],
      [{ PORT: "70000" }, /^PORT must be/],
      [{ HEATCHECK_MAX_UPLOAD_MB: "-1" }, /^HEATCHECK_MAX_UPLOAD_MB must be a number of megabytes/],
      [{ HEATCHECK_WORKERS: "two" }, /^HEATCHECK_WORKERS must be a whole number/],
      [{ HEATCHECK_UPLOADS_PER_CALLER: "1.5" }, /^HEATCHECK_UPLOADS_PER_CALLER must be a whole/],
      [{ HEATCHECK_SHUTDOWN_S: "0" }, /^HEATCHECK_SHUTDOWN_S must be a number of seconds above 0/],
      [{ NEXTAUTH_URL: "pits" }, /^NEXTAUTH_URL must be an address/],
    ];
    for (const [env, message] of cases) {
      let caught: unknown;
      try {
        config(env);
      } catch (e) {
        caught = e;
      }
      expect(caught, JSON.stringify(env)).toBeInstanceOf(ConfigError);
      expect((caught as ConfigError).message).toMatch(message);
      expect((caught as ConfigError).httpStatus).toBe(500);
    }
  });
});
