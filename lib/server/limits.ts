import "server-only";
import { config } from "@/lib/config";
import { uploadsDir } from "./data-folder";

/** Upload size limit: HEATCHECK_MAX_UPLOAD_MB, default 512 MB. */
export function maxUploadBytes(): number {
  return config().maxUploadBytes;
}

/** Where original log files are kept: HEATCHECK_DATA_DIR/uploads (default ./data/uploads). */
export function uploadDir(): string {
  return uploadsDir();
}

/** Uploads one member or one API token may stream at once: HEATCHECK_UPLOADS_PER_CALLER, default 4. */
export function uploadsPerCaller(): number {
  return config().uploadsPerCaller;
}

/**
 * Uploads the whole server streams at once: HEATCHECK_UPLOADS_AT_ONCE, default the number of cores
 * (at least 2). Every upload's bytes pass the server's one thread (multipart, SHA-256, the write)
 * and the one check thread, so more at once only share the same cores more thinly: each crawls,
 * and reads of the queue wait behind them. Past this an upload is told to come back (503 with
 * Retry-After) before its file is parsed or stored (the rest of the body is drained as raw bytes,
 * so the client gets the answer); the upload page retries by itself.
 */
export function uploadsAtOnce(): number {
  return config().uploadsAtOnce;
}

/** Analyses one team may have waiting or running: HEATCHECK_QUEUED_PER_TEAM, default 200. */
export function queuedAnalysesPerTeam(): number {
  return config().queuedPerTeam;
}
