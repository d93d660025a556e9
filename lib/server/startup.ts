import "server-only";
import { readdir, rm } from "node:fs/promises";
import { join } from "node:path";
import { config } from "@/lib/config";
import { reanalyseOutdated, resumePendingAnalyses } from "./analysis-jobs";
import { prepareDataFolder, storedPathOf, uploadsDir } from "./data-folder";
import { db } from "./db";

/** Seconds the server may take to stop after SIGTERM or SIGINT before it exits regardless. */
export function shutdownGraceSeconds(): number {
  return config().shutdownGraceS;
}

/**
 * What the server does once before it takes requests: the data folder made private, stale upload
 * temporaries swept, originals that no record names (a stop between storing and recording) removed,
 * pending analyses re-queued, analyses an earlier engine made queued again, and a bounded shutdown
 * armed.
 */
export async function startServer(): Promise<void> {
  const folder = await prepareDataFolder();
  if (folder.sweptTemporaries > 0) {
    console.log(
      `heatcheck: removed ${folder.sweptTemporaries} interrupted uploads (${(folder.sweptBytes / 1e6).toFixed(1)} MB)`,
    );
  }
  const orphans = await removeOrphanOriginals();
  if (orphans > 0) console.log(`heatcheck: removed ${orphans} stored files no log record names`);
  const n = await resumePendingAnalyses();
  if (n > 0) console.log(`heatcheck: resumed ${n} pending analyses`);
  const { queued } = await reanalyseOutdated();
  if (queued > 0)
    console.log(`heatcheck: analysing ${queued} logs again with this version of the engine`);
  armBoundedShutdown();
}

const ORIGINAL = /^[0-9a-f]{64}\.csv$/;

async function removeOrphanOriginals(): Promise<number> {
  const known = new Set(
    (await db.flightLog.findMany({ select: { storedPath: true } })).map((l) => l.storedPath),
  );
  let removed = 0;
  const walk = async (dir: string): Promise<void> => {
    for (const entry of await readdir(dir, { withFileTypes: true })) {
      const p = join(dir, entry.name);
      if (entry.isDirectory()) await walk(p);
      else if (ORIGINAL.test(entry.name) && !known.has(storedPathOf(p)) && !known.has(p)) {
        await rm(p, { force: true });
        removed++;
      }
    }
  };
  await walk(uploadsDir());
  return removed;
}

function armBoundedShutdown(): void {
  let armed = false;
  for (const signal of ["SIGTERM", "SIGINT"] as const) {
    process.on(signal, () => {
      if (armed) return;
      armed = true;
      // Next closes its server on the signal; an upload or a request that never ends must not
      // hold the process. The database is consistent at any point (SQLite transactions), and
      // a log whose analysis is cut off stays pending and is re-run at the next start.
      setTimeout(() => {
        console.error(`heatcheck: still busy ${shutdownGraceSeconds()} s after ${signal}; exiting`);
        process.exit(signal === "SIGTERM" ? 143 : 130);
      }, shutdownGraceSeconds() * 1000).unref();
    });
  }
}
