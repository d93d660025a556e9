// npm run backup -- <file.tar.gz>: a consistent copy of the database (SQLite's online backup, safe
// while the server runs and writes) and every original log the copy names, in one archive.
// The archive is a gzipped ustar file; README "Backups" describes it. Exit 0 done, 1 failed, 2 usage.
import { createWriteStream } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { isAbsolute, join, resolve } from "node:path";
import { createGzip } from "node:zlib";
import { openSqlite } from "../lib/archive/sqlite-file";
import { config } from "../lib/config";
import { TarWriter } from "../lib/archive/tar";

export const BACKUP_FORMAT = "heatcheck-backup";

async function main(): Promise<number> {
  const target = process.argv[2];
  if (!target || process.argv.length > 3) {
    console.error("usage: npm run backup -- <file.tar.gz>");
    return 2;
  }
  const cwd = config().invocationDir;
  const out = resolve(cwd, target);
  const { dataDir, databaseUrl } = config();
  const dbFile = resolve(databaseUrl.replace(/^file:/, "").replace(/\?.*$/, ""));
  const work = await mkdtemp(join(tmpdir(), "heatcheck-backup-"));
  const t0 = Date.now();
  try {
    const snapshot = join(work, "heatcheck.db");
    const live = openSqlite(dbFile, true);
    try {
      await live.backup(snapshot);
    } finally {
      live.close();
    }
    const copy = openSqlite(snapshot, true);
    const logs = copy.prepare(`SELECT "storedPath" AS p, "sizeBytes" AS n FROM "FlightLog"`).all();
    copy.close();
    const file = createWriteStream(out, { mode: 0o600, flags: "wx" });
    const gzip = createGzip({ level: 6 });
    const done = new Promise<void>((ok, fail) => {
      file.on("finish", ok);
      file.on("error", fail);
      gzip.on("error", fail);
    });
    gzip.pipe(file);
    const tar = new TarWriter(gzip);
    const manifest = {
      format: BACKUP_FORMAT,
      version: 1,
      createdAt: new Date().toISOString(),
      database: "heatcheck.db",
      originals: logs.length,
    };
    await tar.bytes("heatcheck-backup.json", JSON.stringify(manifest, null, 2) + "\n");
    await tar.file("heatcheck.db", snapshot);
    let bytes = 0;
    const missing: string[] = [];
    const seen = new Set<string>();
    for (const l of logs) {
      const stored = String(l.p);
      if (seen.has(stored)) continue;
      seen.add(stored);
      const abs = isAbsolute(stored) ? stored : join(dataDir, stored);
      // Older records hold absolute paths; in the archive every original sits under uploads/.
      const name = isAbsolute(stored) ? `uploads/${stored.split("/").pop() ?? ""}` : stored;
      try {
        await tar.file(name, abs);
        bytes += Number(l.n);
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== "ENOENT") throw e;
        missing.push(stored);
      }
    }
    await tar.end();
    await done;
    console.log(
      `heatcheck: backup written to ${out}: database and ${seen.size - missing.length} originals (${(bytes / 1e6).toFixed(1)} MB) in ${((Date.now() - t0) / 1000).toFixed(1)} s`,
    );
    if (missing.length > 0)
      console.error(
        `heatcheck: ${missing.length} originals named in the database were missing on disk: ${missing.slice(0, 5).join(", ")}`,
      );
    return 0;
  } catch (e) {
    await rm(out, { force: true }).catch(() => undefined);
    console.error(`heatcheck: the backup failed: ${e instanceof Error ? e.message : String(e)}`);
    return 1;
  } finally {
    await rm(work, { recursive: true, force: true });
  }
}

process.exitCode = await main();
