import "server-only";
import { chmod, mkdir, readdir, rm, stat } from "node:fs/promises";
import { isAbsolute, join, relative, resolve, sep } from "node:path";
import { config } from "@/lib/config";

/**
 * The data folder: the SQLite file, the uploaded originals (`uploads/<team>/<sha256>.csv`) and the
 * auth secret. Everything in it is private to the server's user: folders 0700, files 0600.
 * Stored paths in the database are relative to this folder, so the folder can be moved, backed up
 * and restored elsewhere.
 */

export const PRIVATE_DIR_MODE = 0o700;
export const PRIVATE_FILE_MODE = 0o600;
/** Prefix of an upload still streaming in; such files are never referenced by a record. */
export const INCOMING_PREFIX = "incoming-";

export function dataDir(): string {
  return config().dataDir;
}

export function uploadsDir(): string {
  return join(dataDir(), "uploads");
}

/** The SQLite file named by DATABASE_URL (`file:<path>`), or undefined for another kind of URL. */
export function databaseFile(): string | undefined {
  const m = /^file:(.+)$/.exec(config().databaseUrl);
  return m?.[1] ? resolve(m[1].replace(/\?.*$/, "")) : undefined;
}

/** The absolute path of a stored original; older records kept absolute paths, which still work. */
export function storedFileOf(storedPath: string): string {
  return isAbsolute(storedPath) ? storedPath : join(dataDir(), storedPath);
}

/** A path under the data folder as it is stored in the database (forward slashes, relative). */
export function storedPathOf(absolute: string): string {
  const rel = relative(dataDir(), absolute);
  if (rel.startsWith("..") || isAbsolute(rel))
    throw new Error(`${absolute} is outside the data folder`);
  return rel.split(sep).join("/");
}

export async function ensurePrivateDir(dir: string): Promise<void> {
  await mkdir(dir, { recursive: true, mode: PRIVATE_DIR_MODE });
  await chmod(dir, PRIVATE_DIR_MODE);
}

export interface FolderReport {
  /** Interrupted uploads removed. */
  sweptTemporaries: number;
  sweptBytes: number;
  /** Files and folders whose mode was tightened. */
  tightened: number;
}

/**
 * Run once when the server starts, before it takes requests: new files are created private
 * (umask 077), existing ones are made private, and the temporaries of uploads that a stop cut
 * off are removed (no upload is running yet, so every one of them is stale).
 */
export async function prepareDataFolder(): Promise<FolderReport> {
  process.umask(0o077);
  const report: FolderReport = { sweptTemporaries: 0, sweptBytes: 0, tightened: 0 };
  const root = dataDir();
  await ensurePrivateDir(root);
  await ensurePrivateDir(uploadsDir());
  const db = databaseFile();
  if (db) {
    for (const f of [db, `${db}-wal`, `${db}-shm`, `${db}-journal`])
      await tighten(f, PRIVATE_FILE_MODE, report);
  }
  await tighten(join(root, ".auth-secret"), PRIVATE_FILE_MODE, report);
  await walkUploads(uploadsDir(), report);
  return report;
}

async function walkUploads(dir: string, report: FolderReport): Promise<void> {
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) {
      await tighten(p, PRIVATE_DIR_MODE, report);
      await walkUploads(p, report);
    } else if (entry.name.startsWith(INCOMING_PREFIX)) {
      const size = await stat(p).then(
        (s) => s.size,
        () => 0,
      );
      await rm(p, { force: true });
      report.sweptTemporaries++;
      report.sweptBytes += size;
    } else {
      await tighten(p, PRIVATE_FILE_MODE, report);
    }
  }
}

async function tighten(path: string, mode: number, report: FolderReport): Promise<void> {
  const s = await stat(path).catch(() => null);
  if (!s || (s.mode & 0o777) === mode) return;
  await chmod(path, mode);
  report.tightened++;
}
