/**
 * The rules for the part of a log before its rows: what kind of file it is, how long a line may be,
 * how far into the file the header may start, and how a `# key: value` line and the header line are
 * split. The streaming reader (read-log.ts) and the head reader the upload paths use (sniff.ts) both
 * apply these, so a file is judged the same whichever path reads it and however its bytes are chunked.
 */

/** No line of a log, metadata, header or row, may be longer than this (bytes, line ending excluded). */
export const MAX_LINE_BYTES = 1024 * 1024;
/** The header row must start within this many bytes of the file (metadata and blank lines before it). */
export const MAX_PREAMBLE_BYTES = 4 * 1024 * 1024;

/**
 * What a file that is not text is, told from its first bytes: a sentence, or null when the bytes
 * could be UTF-8 text. Magic numbers: gzip 1f 8b (RFC 1952 §2.3.1), zip "PK\x03\x04" (PKWARE
 * APPNOTE §4.3.7), byte-order marks of UTF-16 and UTF-32 (Unicode Standard §23.8); UTF-16 without a
 * mark shows as a NUL in every other byte of ASCII text.
 */
export function nonTextKind(head: Uint8Array): string | null {
  const b0 = head[0];
  const b1 = head[1];
  if (b0 === 0x1f && b1 === 0x8b)
    return "the file is gzip-compressed, not CSV text: unpack it and give the .csv inside";
  if (b0 === 0x50 && b1 === 0x4b && head[2] === 0x03 && head[3] === 0x04) {
    return "the file is a zip archive, not CSV text: unpack it and give the .csv inside";
  }
  if (
    (b0 === 0xff && b1 === 0xfe && head[2] === 0 && head[3] === 0) ||
    (b0 === 0 && b1 === 0 && head[2] === 0xfe && head[3] === 0xff)
  ) {
    return "the file is UTF-32 text: save it as UTF-8 CSV";
  }
  if ((b0 === 0xff && b1 === 0xfe) || (b0 === 0xfe && b1 === 0xff))
    return "the file is UTF-16 text: save it as UTF-8 CSV";
  // No mark: ASCII written as UTF-16 has a NUL in every odd (little-endian) or even (big-endian) byte.
  const n = Math.min(head.length, 512) & ~1;
  if (n >= 8) {
    let evenNul = 0;
    let oddNul = 0;
    for (let i = 0; i < n; i += 2) {
      if (head[i] === 0) evenNul++;
      if (head[i + 1] === 0) oddNul++;
    }
    const pairs = n / 2;
    if ((oddNul > 0.9 * pairs && evenNul === 0) || (evenNul > 0.9 * pairs && oddNul === 0)) {
      return "the file is UTF-16 text: save it as UTF-8 CSV";
    }
  }
  return null;
}

/** The key and value of a `# key: value` line (key lower-cased), or null for a plain comment. */
export function metadataEntry(trimmedLine: string): [string, string] | null {
  const m = /^#\s*([A-Za-z0-9_.-]+)\s*:\s*(.*)$/.exec(trimmedLine);
  if (m?.[1] === undefined) return null;
  return [m[1].toLowerCase(), (m[2] ?? "").trim()];
}

/** The column names of a header line: split at commas, trimmed, one pair of double quotes removed. */
export function splitHeader(line: string): string[] {
  return line.split(",").map((h) => h.trim().replace(/^"(.*)"$/, "$1"));
}

/**
 * A hint for a header that is one column because the file is separated by something other than
 * commas, or an empty string.
 */
export function separatorHint(line: string): string {
  if (line.includes(",")) return "";
  if (line.includes(";"))
    return " (the columns seem separated by semicolons; heatcheck reads comma-separated files)";
  if (line.includes("\t"))
    return " (the columns seem separated by tabs; heatcheck reads comma-separated files)";
  return "";
}
