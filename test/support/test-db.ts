import { execFileSync } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

/**
 * A fresh SQLite file per test file, migrated with the committed migrations (`prisma migrate
 * deploy`), and the environment pointed at it before any server module is imported.
 */
export function freshDatabase(label: string): { dir: string; url: string } {
  const dir = mkdtempSync(join(tmpdir(), `heatcheck-${label}-`));
  const url = `file:${join(dir, "test.db")}`;
  execFileSync("npx", ["prisma", "migrate", "deploy"], {
    env: { ...process.env, DATABASE_URL: url },
    stdio: "pipe",
  });
  process.env.DATABASE_URL = url;
  process.env.HEATCHECK_DATA_DIR = dir;
  process.env.HEATCHECK_WORKERS = "0";
  return { dir, url };
}
