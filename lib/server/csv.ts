import "server-only";

/**
 * One CSV field (RFC 4180): quoted when it holds a comma, quote or line break, quotes doubled.
 * Dates as ISO 8601 UTC, lists and objects as JSON, nothing (null, undefined) as an empty field.
 */
export function csvField(v: unknown): string {
  const s =
    v === null || v === undefined
      ? ""
      : v instanceof Date
        ? v.toISOString()
        : typeof v === "string"
          ? v
          : typeof v === "number" || typeof v === "boolean" || typeof v === "bigint"
            ? String(v)
            : JSON.stringify(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
