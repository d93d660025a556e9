import "server-only";
import { join } from "node:path";

/** Upload size limit: HEATCHECK_MAX_UPLOAD_MB, default 512 MB. */
export function maxUploadBytes(): number {
  const mb = Number(process.env.HEATCHECK_MAX_UPLOAD_MB ?? 512);
  return (Number.isFinite(mb) && mb > 0 ? mb : 512) * 1024 * 1024;
}

/** Where original log files are kept: HEATCHECK_DATA_DIR/uploads (default ./data/uploads). */
export function uploadDir(): string {
  return join(process.env.HEATCHECK_DATA_DIR ?? join(process.cwd(), "data"), "uploads");
}
