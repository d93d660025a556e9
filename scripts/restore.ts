// npm run restore -- <file.tar.gz>: puts a backup made by `npm run backup` into an empty data
// folder (HEATCHECK_DATA_DIR, default ./data). It refuses a folder that already holds a database
// or originals, so nothing is overwritten. `npm start` then applies any newer migrations.
// Exit 0 done, 1 failed, 2 usage.
import { createReadStream, existsSync } from "node:fs";
import { chmod, mkdir, readdir, readFile, rm } from "node:fs/promises";
import { dirname, join, resolve } from "node:path";
import { createGunzip } from "node:zlib";
import { openSqlite } from "../lib/archive/sqlite-file";
import { config } from "../lib/config";
import { readTar, writeEntryFile } from "../lib/archive/tar";

async function main(): Promise<number> {
  const source = process.argv[2];
  if (!source || process.argv.length > 3) {
    console.error("usage: npm run restore -- <file.tar.gz>");
    return 2;
  }
  const archive = resolve(config().invocationDir, source);
  const { dataDir, databaseUrl } = config();
  const dbFile = resolve(databaseUrl.replace(/^file:/, "").replace(/\?.*$/, ""));
  if (!existsSync(archive)) {
    console.error(`heatcheck: ${archive} does not exist.`);
    return 1;
  }
  const present = existsSync(dataDir)
    ? (await readdir(dataDir)).filter((f) => f !== ".auth-secret" && f !== "lost+found")
    : [];
  if (present.length > 0 || existsSync(dbFile)) {
    console.error(
      `heatcheck: ${dataDir} is not empty (${present.slice(0, 3).join(", ") || dbFile}); restore into an empty data folder.`,
    );
    return 1;
  }
  await mkdir(dataDir, { recursive: true, mode: 0o700 });
  await chmod(dataDir, 0o700);
  const staging = join(dataDir, `.restore-${process.pid}`);
  await mkdir(staging, { mode: 0o700 });
  let files = 0;
  let manifestOk = false;
  try {
    await readTar(createReadStream(archive).pipe(createGunzip()), async (entry, body) => {
      if (entry.type === "directory") return;
      if (
        entry.name !== "heatcheck-backup.json" &&
        entry.name !== "heatcheck.db" &&
        !entry.name.startsWith("uploads/")
      ) {
        throw new Error(`the archive holds ${entry.name}, which is not part of a heatcheck backup`);
      }
      const target = join(staging, entry.name);
      await mkdir(dirname(target), { recursive: true, mode: 0o700 });
      const n = await writeEntryFile(target, body, 0o600);
      if (n !== entry.size) throw new Error(`${entry.name} is cut short in the archive`);
      files++;
    });
    const manifest = JSON.parse(await readFile(join(staging, "heatcheck-backup.json"), "utf8")) as {
      format?: string;
    };
    manifestOk = manifest.format === "heatcheck-backup";
    if (!manifestOk)
      throw new Error("the archive is not a heatcheck backup (its manifest names another format)");
    const check = openSqlite(join(staging, "heatcheck.db"), true);
    const integrity = check.pragma("integrity_check", { simple: true });
    const logs = check.prepare(`SELECT "storedPath" AS p FROM "FlightLog"`).all();
    check.close();
    if (integrity !== "ok")
      throw new Error(
        `the database in the archive fails SQLite's integrity check (${String(integrity)})`,
      );
    const missing = logs.filter(
      (l) => !String(l.p).startsWith("/") && !existsSync(join(staging, String(l.p))),
    );
    // Move into place: the database last, so a half-done restore never looks like a data folder.
    const { rename } = await import("node:fs/promises");
    if (existsSync(join(staging, "uploads")))
      await rename(join(staging, "uploads"), join(dataDir, "uploads"));
    else await mkdir(join(dataDir, "uploads"), { mode: 0o700 });
    await mkdir(dirname(dbFile), { recursive: true, mode: 0o700 });
    await rename(join(staging, "heatcheck.db"), dbFile);
    console.log(
      `heatcheck: restored ${files - 1} files into ${dataDir} (database ${dbFile}); run npm start.`,
    );
    if (missing.length > 0)
      console.error(
        `heatcheck: ${missing.length} originals named in the database were not in the archive.`,
      );
    return 0;
  } catch (e) {
    console.error(
      `heatcheck: the restore failed, nothing was put in place: ${e instanceof Error ? e.message : String(e)}`,
    );
    return 1;
  } finally {
    await rm(staging, { recursive: true, force: true });
  }
}

process.exitCode = await main();
