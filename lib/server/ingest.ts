import "server-only";
import { createHash, randomUUID, type Hash } from "node:crypto";
import { open, rename, rm, type FileHandle } from "node:fs/promises";
import { join } from "node:path";
import {
  InputError,
  InsufficientStorageError,
  LimitExceededError,
  LogFormatError,
} from "@/lib/errors";
import { parseColumnMap } from "@/lib/logs/columns";
import { formatBytes, type ReadSummary } from "@/lib/logs/read-log";
import { matchAirframe } from "@/lib/logs/sniff";
import type { Actor } from "@/lib/roles";
import { enqueueAnalysis } from "./analysis-jobs";
import { audit } from "./audit";
import { db } from "./db";
import { assertRole } from "./authorize";
import { INCOMING_PREFIX, PRIVATE_FILE_MODE, ensurePrivateDir, storedPathOf } from "./data-folder";
import { maxUploadBytes, uploadDir } from "./limits";
import { isDiskFull } from "./storage-errors";
import { checkUploadStream } from "./upload-checker";
import { takeUploadSlot } from "./upload-slots";

export interface IngestRequest {
  fileName: string;
  body: AsyncIterable<Uint8Array>;
  /** Chosen airframe (overrides the file's own metadata and name). */
  airframeId?: string;
  airframeName?: string;
  /** Column map for foreign headers (typed, or from a saved import profile). */
  mapText?: string;
}

export interface IngestResult {
  logId: string;
  airframe: string;
  duplicate: boolean;
  matchedBy: "chosen" | "metadata" | "file name";
}

/**
 * `# flown_at:` must fall in this range; outside it the date is a typo. The Unix epoch is allowed:
 * it is what a logger without a set clock writes.
 */
export const EARLIEST_FLOWN_AT = new Date("1970-01-01T00:00:00Z");
/** How far ahead of the server's clock a flight may be dated (a pit laptop's clock may be off). */
export const FLOWN_AT_LEEWAY_MS = 2 * 24 * 3600_000;

/**
 * Takes an uploaded log. While the bytes stream in they are hashed, written to a private
 * temporary file and read by the same log reader the analysis uses, so a file that cannot be read
 * is refused before anything is recorded (422 with line, column and the reason), a file over the
 * limit stops at the limit (413), a full disk answers 507. Only a file that passed every check is
 * renamed into place and recorded as pending; every other path removes the temporary. A re-upload
 * of the same bytes (even at the same moment) gets the existing log, marked duplicate.
 */
export async function ingestLog(actor: Actor, req: IngestRequest): Promise<IngestResult> {
  assertRole(actor, "pilot");
  const release = await takeUploadSlot(actor);
  try {
    return await ingest(actor, req);
  } finally {
    release();
  }
}

async function ingest(actor: Actor, req: IngestRequest): Promise<IngestResult> {
  const mapText = req.mapText?.trim() || undefined;
  // Parsed here first, so a bad map is refused (400, naming the key) before any byte is stored.
  if (mapText) parseColumnMap(mapText);
  const teamDir = join(uploadDir(), actor.teamId);
  const tmp = join(teamDir, `${INCOMING_PREFIX}${randomUUID()}.part`);
  const limit = maxUploadBytes();
  const spool = await Spool.create(teamDir, tmp).catch(rethrowStorage);
  let stored: string | null = null;
  try {
    const bytes = spool.tee(req.body, limit);
    let summary: ReadSummary;
    try {
      summary = await checkUploadStream(bytes, { mapText, maxBytes: limit });
    } catch (e) {
      // The reader stopped early: end the tee too, so the request's stream is released (and can
      // be drained by the multipart reader) instead of staying attached to a suspended loop.
      await bytes.return(undefined).catch(() => undefined);
      throw spool.failure ?? e;
    }
    await spool.close().catch(rethrowStorage);
    const hash = spool.digest();
    const flownAt = parseFlownAt(summary.info.metadata.flown_at);
    const existing = await findExisting(actor, hash);
    if (existing) return existing;
    const { airframe, matchedBy } = await resolveAirframe(
      actor,
      req,
      summary.info.metadata.airframe,
    );
    return await oneAtATime(`${actor.teamId}:${hash}`, async () => {
      const again = await findExisting(actor, hash);
      if (again) return again;
      const target = join(teamDir, `${hash}.csv`);
      await rename(tmp, target).catch(rethrowStorage);
      stored = target;
      try {
        const log = await db.$transaction(async (tx) => {
          const created = await tx.flightLog.create({
            data: {
              teamId: actor.teamId,
              airframeId: airframe.id,
              fileName: req.fileName.slice(0, 200),
              storedPath: storedPathOf(target),
              sizeBytes: spool.bytes,
              contentHash: hash,
              flownAt,
              mapText: mapText ?? null,
              uploadedById: actor.userId ?? "token",
            },
          });
          await audit(
            tx,
            actor,
            "upload log",
            "airframe",
            airframe.id,
            `${req.fileName} (${formatBytes(spool.bytes)})`,
          );
          return created;
        });
        stored = null;
        void enqueueAnalysis(log.id);
        return { logId: log.id, airframe: airframe.name, duplicate: false, matchedBy };
      } catch (e) {
        // Another process recorded the same bytes first: that record owns the file now.
        const raced = await findExisting(actor, hash);
        if (raced) {
          stored = null;
          return raced;
        }
        throw e;
      }
    });
  } catch (e) {
    throw isDiskFull(e) ? new InsufficientStorageError() : e;
  } finally {
    await spool.discard();
    if (stored) await rm(stored, { force: true });
  }
}

function rethrowStorage(e: unknown): never {
  throw isDiskFull(e) ? new InsufficientStorageError() : e;
}

async function findExisting(actor: Actor, hash: string): Promise<IngestResult | null> {
  const existing = await db.flightLog.findUnique({
    where: { teamId_contentHash: { teamId: actor.teamId, contentHash: hash } },
    include: { airframe: { select: { name: true } } },
  });
  return existing
    ? {
        logId: existing.id,
        airframe: existing.airframe?.name ?? "",
        duplicate: true,
        matchedBy: "chosen",
      }
    : null;
}

// Recording one content hash for one team happens one request at a time in this process, so
// parallel uploads of the same bytes all end on the one record.
const locks = ((
  globalThis as unknown as { heatcheckIngestLocks?: Map<string, Promise<unknown>> }
).heatcheckIngestLocks ??= new Map<string, Promise<unknown>>());

async function oneAtATime<T>(key: string, run: () => Promise<T>): Promise<T> {
  const before = locks.get(key) ?? Promise.resolve();
  const mine = before.catch(() => undefined).then(run);
  locks.set(key, mine);
  try {
    return await mine;
  } finally {
    if (locks.get(key) === mine) locks.delete(key);
  }
}

/**
 * The temporary file of one upload: bytes are hashed, counted and written as they pass to the
 * reader. Writes go through a FileHandle (errors are rejections, never stray events) in batches.
 */
class Spool {
  bytes = 0;
  /** The first storage or size failure, kept so the reader's wrapping does not hide it. */
  failure: Error | null = null;
  private readonly hash: Hash = createHash("sha256");
  private pending: Uint8Array[] = [];
  private pendingBytes = 0;
  private closed = false;

  private constructor(
    private readonly path: string,
    private readonly fh: FileHandle,
  ) {}

  static async create(dir: string, path: string): Promise<Spool> {
    await ensurePrivateDir(dir);
    return new Spool(path, await open(path, "wx", PRIVATE_FILE_MODE));
  }

  async *tee(body: AsyncIterable<Uint8Array>, limit: number): AsyncGenerator<Uint8Array> {
    for await (const chunk of body) {
      this.bytes += chunk.length;
      if (this.bytes > limit) {
        this.failure = new LimitExceededError(
          `The file is larger than the ${formatBytes(limit)} upload limit.`,
        );
        throw this.failure;
      }
      this.hash.update(chunk);
      this.pending.push(chunk);
      this.pendingBytes += chunk.length;
      if (this.pendingBytes >= 1 << 20) await this.flush();
      yield chunk;
    }
    await this.flush();
  }

  private async flush(): Promise<void> {
    if (this.pendingBytes === 0) return;
    const batch = this.pending;
    this.pending = [];
    this.pendingBytes = 0;
    try {
      await this.fh.writev(batch);
    } catch (e) {
      this.failure = isDiskFull(e)
        ? new InsufficientStorageError()
        : e instanceof Error
          ? e
          : new Error(String(e));
      throw this.failure;
    }
  }

  digest(): string {
    return this.hash.digest("hex");
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await this.fh.sync();
    await this.fh.close();
  }

  /** Closes the handle if still open and removes the temporary (a no-op once renamed). */
  async discard(): Promise<void> {
    if (!this.closed) {
      this.closed = true;
      await this.fh.close().catch(() => undefined);
    }
    await rm(this.path, { force: true }).catch(() => undefined);
  }
}

async function resolveAirframe(
  actor: Actor,
  req: IngestRequest,
  metadataAirframe: string | undefined,
) {
  if (req.airframeId) {
    const a = await db.airframe.findFirst({ where: { id: req.airframeId, teamId: actor.teamId } });
    if (!a) throw new InputError("The chosen airframe is not in this team.", "airframeId");
    return { airframe: a, matchedBy: "chosen" as const };
  }
  const airframes = await db.airframe.findMany({ where: { teamId: actor.teamId, retired: false } });
  if (req.airframeName) {
    const a = airframes.find(
      (x) => x.name.toLowerCase() === req.airframeName?.trim().toLowerCase(),
    );
    if (!a)
      throw new InputError(
        `There is no airframe named "${req.airframeName}" in this team.`,
        "airframe",
      );
    return { airframe: a, matchedBy: "chosen" as const };
  }
  const match = matchAirframe(
    airframes.map((a) => a.name),
    { metadataAirframe, fileName: req.fileName },
  );
  const a = match ? airframes.find((x) => x.name === match.name) : undefined;
  if (!a || !match) {
    throw new InputError(
      `${req.fileName} names no known airframe${metadataAirframe ? ` ("${metadataAirframe}" in its metadata)` : ""}: choose one.`,
      "airframeId",
    );
  }
  return { airframe: a, matchedBy: match.how };
}

/** `# flown_at:` as a date; absent means now. A date that does not parse or is out of range is refused. */
export function parseFlownAt(text: string | undefined, now = new Date()): Date {
  if (text === undefined || text.trim() === "") return now;
  const trimmed = text.trim();
  // ISO 8601 date with optional time; Date.parse alone also takes "10000-01-01" or "March 3".
  const iso = /^\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/.test(
    trimmed,
  );
  const d = new Date(trimmed);
  const latest = new Date(now.getTime() + FLOWN_AT_LEEWAY_MS);
  if (!iso || Number.isNaN(d.getTime()) || d < EARLIEST_FLOWN_AT || d > latest) {
    throw new LogFormatError(
      `# flown_at: "${trimmed.slice(0, 40)}" is not a date between ${EARLIEST_FLOWN_AT.toISOString().slice(0, 10)} and ${latest.toISOString().slice(0, 10)}; write it as ISO 8601, e.g. 2026-11-28T14:05:00Z`,
      { columnName: "flown_at" },
    );
  }
  return d;
}

/** Queues a stored log's analysis again (after a map fix or an engine update). */
export async function reanalyseLog(actor: Actor, logId: string, mapText?: string): Promise<void> {
  assertRole(actor, "tech");
  const log = await db.flightLog.findFirst({ where: { id: logId, teamId: actor.teamId } });
  if (!log) throw new InputError("That log is not in this team.");
  if (mapText !== undefined) parseColumnMap(mapText);
  await db.flightLog.update({
    where: { id: log.id },
    data: { status: "pending", error: null, ...(mapText !== undefined ? { mapText } : {}) },
  });
  void enqueueAnalysis(log.id);
}
