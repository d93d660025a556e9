import { LogFormatError } from "../errors";
import { formatBytes } from "./format";
import type { HeadFound } from "./types";

/**
 * The rules for the part of a log before its rows: what kind of file it is, how long a line may be,
 * how far into the file the header may start, and how a `# key: value` line and the header line are
 * split. The streaming reader (read-log.ts) and the head reader the upload paths use (sniff.ts) both
 * read the preamble with one Preamble, so a file is judged the same whichever path reads it and
 * however its bytes are chunked.
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

/** The header row as found: the head of the log, and the line's text (for the separator hint). */
export interface HeaderLine {
  head: HeadFound;
  text: string;
}

/**
 * Reads the lines before the rows, one at a time: blank lines and comments are skipped, `# key:
 * value` lines fill the metadata, and the first other line is the header row (then `found` is set
 * and no more lines may be given). Throws LogFormatError, naming the line, for binary data, text
 * that is not UTF-8, a first line of numbers, or no header within MAX_PREAMBLE_BYTES.
 */
export class Preamble {
  readonly metadata: Record<string, string> = {};
  /** 1-based number of the last line read. */
  line = 0;
  /** Set once the header row was read. */
  found: HeaderLine | null = null;
  private bytes = 0;

  /** Reads the line starting at `start` (bytes up to `end` hold whole lines) and returns the index after it. */
  read(bytes: Uint8Array, start: number, end: number): number {
    let eol = bytes.indexOf(10, start);
    if (eol < 0 || eol >= end) eol = end;
    this.line++;
    let lineEnd = eol;
    if (lineEnd > start && bytes[lineEnd - 1] === 13) lineEnd--;
    this.lineText(bytes, start, lineEnd);
    this.bytes += eol + 1 - start;
    return eol + 1;
  }

  private lineText(bytes: Uint8Array, start: number, end: number): void {
    if (this.bytes >= MAX_PREAMBLE_BYTES) {
      throw new LogFormatError(
        `no header row in the first ${formatBytes(MAX_PREAMBLE_BYTES)}: after the # metadata lines, the first line must name the columns`,
        { line: this.line },
      );
    }
    for (let i = start; i < end; i++) {
      const b = bytes[i] ?? 0;
      if (b === 0 || (b < 0x20 && b !== 0x09)) {
        throw new LogFormatError("the file holds binary data, not CSV text", { line: this.line });
      }
    }
    const text = new TextDecoder("utf-8", { fatal: false })
      .decode(bytes.subarray(start, end))
      .replace(/^\uFEFF/, "");
    if (text.includes("\uFFFD")) {
      throw new LogFormatError(
        "the file holds binary data or an unknown text encoding, not UTF-8 CSV",
        { line: this.line },
      );
    }
    const trimmed = text.trim();
    if (trimmed === "") return;
    if (trimmed.startsWith("#")) {
      const entry = metadataEntry(trimmed);
      if (entry) this.metadata[entry[0]] = entry[1];
      return;
    }
    const headers = splitHeader(text);
    if (headers.every((h) => h !== "" && Number.isFinite(Number(h)))) {
      throw new LogFormatError(
        "the first line holds numbers, not column names: add a header row such as time_us,gyro_roll,gyro_pitch,gyro_yaw",
        { line: this.line },
      );
    }
    this.found = { head: { metadata: this.metadata, headers, line: this.line }, text };
  }
}
