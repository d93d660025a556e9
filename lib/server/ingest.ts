import "server-only";
import { createHash, randomUUID } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, open, rename, rm } from "node:fs/promises";
import { join } from "node:path";
import { InputError, LimitExceededError } from "@/lib/errors";
import { checkMap, parseColumnMap } from "@/lib/logs/columns";
import { formatBytes } from "@/lib/logs/read-log";
import { matchAirframe, sniffLogHead } from "@/lib/logs/sniff";
import type { Actor } from "@/lib/roles";
import { enqueueAnalysis } from "./analysis-jobs";
import { audit } from "./audit";
import { db } from "./db";
import { assertRole } from "./authorize";
import { maxUploadBytes, uploadDir } from "./limits";

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
 * Takes an uploaded log: streams it to disk while hashing it and counting bytes (over the limit,
 * the upload stops and nothing is kept), recognises a re-upload by its content hash, matches it to
 * an airframe, checks its columns, records it as pending and queues the analysis. A rejected file
 * leaves no file and no row behind.
 */
export async function ingestLog(actor: Actor, req: IngestRequest): Promise<IngestResult> {
  assertRole(actor, "pilot");
  const dir = uploadDir();
  await mkdir(dir, { recursive: true });
  const tmp = join(dir, `incoming-${randomUUID()}.part`);
  const limit = maxUploadBytes();
  let kept = false;
  try {
    const { hash, bytes } = await streamToFile(req.body, tmp, limit);
    if (bytes === 0) throw new InputError(`${req.fileName} is empty.`);
    const existing = await db.flightLog.findUnique({ where: { teamId_contentHash: { teamId: actor.teamId, contentHash: hash } }, include: { airframe: true } });
    if (existing) {
      return { logId: existing.id, airframe: existing.airframe?.name ?? "", duplicate: true, matchedBy: "chosen" };
    }
    const head = sniffLogHead(await readHead(tmp));
    if (!head) throw new InputError(`${req.fileName} has no header row; it does not look like a CSV flight log.`);
    const mapText = req.mapText?.trim() || undefined;
    if (mapText) {
      parseColumnMap(mapText);
    } else if (head.proposal.missing.length > 0) {
      throw new InputError(
        `${req.fileName}: no column for ${head.proposal.missing.join(", ")}. Give a column map (or choose an import profile) for its headers: ${head.headers.slice(0, 12).join(", ")}`,
        "mapText",
      );
    } else {
      checkMap(head.proposal.map);
    }
    const { airframe, matchedBy } = await resolveAirframe(actor, req, head.metadata.airframe);
    const flownAt = parseFlownAt(head.metadata.flown_at);
    const stored = join(dir, `${hash}.csv`);
    await rename(tmp, stored);
    kept = true;
    const log = await db.$transaction(async (tx) => {
      const created = await tx.flightLog.create({
        data: {
          teamId: actor.teamId,
          airframeId: airframe.id,
          fileName: req.fileName.slice(0, 200),
          storedPath: stored,
          sizeBytes: bytes,
          contentHash: hash,
          flownAt,
          mapText: mapText ?? null,
          uploadedById: actor.userId ?? "token",
        },
      });
      await audit(tx, actor, "upload log", "airframe", airframe.id, `${req.fileName} (${formatBytes(bytes)})`);
      return created;
    });
    void enqueueAnalysis(log.id);
    return { logId: log.id, airframe: airframe.name, duplicate: false, matchedBy };
  } finally {
    if (!kept) await rm(tmp, { force: true });
  }
}

async function streamToFile(body: AsyncIterable<Uint8Array>, path: string, limit: number): Promise<{ hash: string; bytes: number }> {
  const hash = createHash("sha256");
  const out = createWriteStream(path);
  let bytes = 0;
  try {
    for await (const chunk of body) {
      bytes += chunk.length;
      if (bytes > limit) throw new LimitExceededError(`The file is larger than the ${formatBytes(limit)} upload limit.`);
      hash.update(chunk);
      if (!out.write(chunk)) await new Promise<void>((resolve) => out.once("drain", resolve));
    }
  } finally {
    await new Promise<void>((resolve) => out.end(resolve));
  }
  return { hash: hash.digest("hex"), bytes };
}

async function readHead(path: string): Promise<string> {
  const fh = await open(path, "r");
  try {
    const buf = Buffer.alloc(64 * 1024);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    return buf.subarray(0, bytesRead).toString("utf8");
  } finally {
    await fh.close();
  }
}

async function resolveAirframe(actor: Actor, req: IngestRequest, metadataAirframe: string | undefined) {
  if (req.airframeId) {
    const a = await db.airframe.findFirst({ where: { id: req.airframeId, teamId: actor.teamId } });
    if (!a) throw new InputError("The chosen airframe is not in this team.", "airframeId");
    return { airframe: a, matchedBy: "chosen" as const };
  }
  const airframes = await db.airframe.findMany({ where: { teamId: actor.teamId, retired: false } });
  if (req.airframeName) {
    const a = airframes.find((x) => x.name.toLowerCase() === req.airframeName?.trim().toLowerCase());
    if (!a) throw new InputError(`There is no airframe named "${req.airframeName}" in this team.`, "airframe");
    return { airframe: a, matchedBy: "chosen" as const };
  }
  const match = matchAirframe(airframes.map((a) => a.name), { metadataAirframe, fileName: req.fileName });
  const a = match ? airframes.find((x) => x.name === match.name) : undefined;
  if (!a || !match) {
    throw new InputError(
      `${req.fileName} names no known airframe${metadataAirframe ? ` ("${metadataAirframe}" in its metadata)` : ""}: choose one.`,
      "airframeId",
    );
  }
  return { airframe: a, matchedBy: match.how };
}

function parseFlownAt(text: string | undefined): Date {
  if (!text) return new Date();
  const d = new Date(text);
  return Number.isNaN(d.getTime()) ? new Date() : d;
}

/** Queues a stored log's analysis again (after a map fix or an engine update). */
export async function reanalyseLog(actor: Actor, logId: string, mapText?: string): Promise<void> {
  assertRole(actor, "tech");
  const log = await db.flightLog.findFirst({ where: { id: logId, teamId: actor.teamId } });
  if (!log) throw new InputError("That log is not in this team.");
  if (mapText !== undefined) parseColumnMap(mapText);
  await db.flightLog.update({ where: { id: log.id }, data: { status: "pending", error: null, ...(mapText !== undefined ? { mapText } : {}) } });
  void enqueueAnalysis(log.id);
}
