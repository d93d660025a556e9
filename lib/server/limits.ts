import "server-only";
import { uploadsDir } from "./data-folder";

/** Upload size limit: HEATCHECK_MAX_UPLOAD_MB, default 512 MB. */
export function maxUploadBytes(): number {
  const mb = Number(process.env.HEATCHECK_MAX_UPLOAD_MB ?? 512);
  return (Number.isFinite(mb) && mb > 0 ? mb : 512) * 1024 * 1024;
}

/** Where original log files are kept: HEATCHECK_DATA_DIR/uploads (default ./data/uploads). */
export function uploadDir(): string {
  return uploadsDir();
}

function positiveInt(name: string, fallback: number): number {
  const v = Number(process.env[name]);
  return Number.isInteger(v) && v > 0 ? v : fallback;
}

/** Uploads one member or one API token may stream at once: HEATCHECK_UPLOADS_PER_CALLER, default 4. */
export function uploadsPerCaller(): number {
  return positiveInt("HEATCHECK_UPLOADS_PER_CALLER", 4);
}

/** Analyses one team may have waiting or running: HEATCHECK_QUEUED_PER_TEAM, default 200. */
export function queuedAnalysesPerTeam(): number {
  return positiveInt("HEATCHECK_QUEUED_PER_TEAM", 200);
}
