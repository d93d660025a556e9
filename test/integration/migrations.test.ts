import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";

// The committed migrations, applied in order to a real SQLite file, keep what the rows held:
// a migration that renames a column must carry every value over (SQLite's ALTER TABLE … RENAME
// COLUMN, SQLite ≥ 3.25, sqlite.org/lang_altertable.html). Data here is generated for the test.

interface Db {
  exec(sql: string): void;
  prepare(sql: string): {
    run(...p: unknown[]): unknown;
    all(...p: unknown[]): Record<string, unknown>[];
  };
  close(): void;
}
const require = createRequire(import.meta.url);
const Database = require("better-sqlite3") as new (file: string) => Db;

const MIGRATIONS = join(process.cwd(), "prisma", "migrations");
const ordered = readdirSync(MIGRATIONS, { withFileTypes: true })
  .filter((e) => e.isDirectory())
  .map((e) => e.name)
  .sort();
const sqlOf = (name: string) => readFileSync(join(MIGRATIONS, name, "migration.sql"), "utf8");

const dir = mkdtempSync(join(tmpdir(), "heatcheck-migrations-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("the airframe state migration", () => {
  it("renames Airframe.status to state and keeps every airframe's ready/grounded value", () => {
    const rename = ordered.findIndex((n) => n.endsWith("_airframe_state"));
    expect(rename).toBeGreaterThan(0);
    const db = new Database(join(dir, "state.db"));
    try {
      for (const name of ordered.slice(0, rename)) db.exec(sqlOf(name));
      db.prepare(`INSERT INTO "Team" ("id", "name") VALUES ('t1', 'Test team')`).run();
      const insert = db.prepare(
        `INSERT INTO "Airframe" ("id", "teamId", "name", "frameDesign", "status") VALUES (?, 't1', ?, 'test frame', ?)`,
      );
      insert.run("a1", "one", "grounded");
      insert.run("a2", "two", "ready");
      for (const name of ordered.slice(rename)) db.exec(sqlOf(name));
      const rows = db.prepare(`SELECT "id", "state" FROM "Airframe" ORDER BY "id"`).all();
      expect(rows).toEqual([
        { id: "a1", state: "grounded" },
        { id: "a2", state: "ready" },
      ]);
      const columns = db
        .prepare(`PRAGMA table_info("Airframe")`)
        .all()
        .map((c) => c.name);
      expect(columns).toContain("state");
      expect(columns).not.toContain("status");
    } finally {
      db.close();
    }
  });
});
