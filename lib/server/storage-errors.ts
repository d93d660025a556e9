import "server-only";

/** True for a write that failed because the disk (or the user's quota) is full, in fs or in SQLite. */
export function isDiskFull(e: unknown): boolean {
  if (!(e instanceof Error)) return false;
  const code = (e as NodeJS.ErrnoException).code;
  if (code === "ENOSPC" || code === "EDQUOT" || code === "SQLITE_FULL") return true;
  return /SQLITE_FULL|database or disk is full|ENOSPC|no space left on device/i.test(
    `${e.message} ${e.cause instanceof Error ? e.cause.message : typeof e.cause === "string" ? e.cause : ""}`,
  );
}
