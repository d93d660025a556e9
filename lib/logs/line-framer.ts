import { LogFormatError } from "../errors";
import { MAX_LINE_BYTES, nonTextKind } from "./preamble";

/**
 * Line framing for the log reader: bytes in chunks of any size in, complete lines out. The first
 * bytes are held until the file's kind (not text: gzip, zip, UTF-16 …) and its line ending are
 * known; lines ending in a lone CR are read as LF lines; the unfinished last line of a chunk is
 * carried to the next; a line over MAX_LINE_BYTES is refused. Where the chunks are cut changes
 * nothing: the same lines arrive and the same line is refused.
 */

/** Bytes looked at to tell what kind of file this is before reading it as lines. */
export const KIND_PROBE_BYTES = 512;

/** Where framed lines go. */
export interface LineConsumer {
  /** Complete lines in bytes[start, end); bytes[end - 1] is a line feed (a CR before it stays). */
  lines(bytes: Uint8Array, start: number, end: number): void;
  /** True once the consumer wants no more lines (a head reader that has its header). */
  stopped(): boolean;
  /** The error for a line over MAX_LINE_BYTES that comes after the lines handed on so far. */
  longLine(): LogFormatError;
}

export class LineFramer {
  private readonly consumer: LineConsumer;
  private started = false;
  // The first bytes, held until the file's kind and its line ending are known.
  private startBuf: Uint8Array = new Uint8Array(0);
  private startLen = 0;
  private startScanned = 0;
  /** Lines end in a lone CR (old Macintosh text): CRs are read as line feeds. */
  private crOnly = false;
  // The unfinished last line of the previous chunk, in a buffer that grows by doubling.
  private carry: Uint8Array = new Uint8Array(0);
  private carryLen = 0;

  constructor(consumer: LineConsumer) {
    this.consumer = consumer;
  }

  /** The next bytes of the file. Throws LogFormatError for a file that is not text or a line too long. */
  push(chunk: Uint8Array): void {
    if (this.started) this.feed(chunk);
    else this.hold(chunk, false);
  }

  /** Decides the file's kind from the bytes pushed so far (for a head that is only a slice of a file). */
  settle(): void {
    if (!this.started) this.hold(new Uint8Array(0), true);
  }

  /** The end of the input: held bytes are read, and a last line without a line ending too. */
  end(): void {
    this.settle();
    if (this.carryLen > 0 && !this.consumer.stopped()) {
      const last = new Uint8Array(this.carryLen + 1);
      last.set(this.carry.subarray(0, this.carryLen));
      last[this.carryLen] = 10;
      this.carryLen = 0;
      this.consumer.lines(last, 0, last.length);
    }
  }

  /** Holds the first bytes until the file's kind and line ending can be told, then reads them. */
  private hold(chunk: Uint8Array, final: boolean): void {
    if (chunk.length > 0) {
      this.startBuf = grow(this.startBuf, this.startLen, chunk.length);
      this.startBuf.set(chunk, this.startLen);
      this.startLen += chunk.length;
    }
    const b = this.startBuf;
    const n = this.startLen;
    let ending: "lf" | "cr" | "unknown" = "unknown";
    let i = this.startScanned;
    while (i < n && b[i] !== 10 && b[i] !== 13) i++;
    this.startScanned = i;
    if (i < n) {
      if (b[i] === 10) ending = "lf";
      else if (i + 1 < n) ending = b[i + 1] === 10 ? "lf" : "cr";
      else if (final) ending = "lf";
    }
    const decided =
      final || n > MAX_LINE_BYTES + 1 || (n >= KIND_PROBE_BYTES && ending !== "unknown");
    if (!decided) return;
    const kind = nonTextKind(b.subarray(0, Math.min(n, KIND_PROBE_BYTES)));
    if (kind) throw new LogFormatError(kind);
    this.crOnly = ending === "cr";
    this.started = true;
    const held = b.subarray(0, n);
    this.startBuf = new Uint8Array(0);
    this.startLen = 0;
    this.feed(held);
  }

  /** Frames bytes into lines: whole lines are read at once, the unfinished tail is carried. */
  private feed(input: Uint8Array): void {
    let chunk = input;
    if (this.crOnly) {
      chunk = new Uint8Array(input.length);
      for (let i = 0; i < input.length; i++) {
        const c = input[i] ?? 0;
        chunk[i] = c === 13 ? 10 : c;
      }
    }
    let pos = 0;
    if (this.carryLen > 0) {
      const nl = chunk.indexOf(10);
      if (nl < 0) {
        this.appendCarry(chunk);
        return;
      }
      this.appendCarry(chunk.subarray(0, nl + 1));
      const joined = this.carry.subarray(0, this.carryLen);
      this.carryLen = 0;
      this.checkedLines(joined, 0, joined.length);
      if (this.consumer.stopped()) return;
      pos = nl + 1;
    }
    const lastNl = chunk.lastIndexOf(10);
    if (lastNl < pos) {
      this.appendCarry(chunk.subarray(pos));
      return;
    }
    this.checkedLines(chunk, pos, lastNl + 1);
    if (lastNl + 1 < chunk.length && !this.consumer.stopped())
      this.appendCarry(chunk.subarray(lastNl + 1));
  }

  private appendCarry(part: Uint8Array): void {
    this.carry = grow(this.carry, this.carryLen, part.length);
    this.carry.set(part, this.carryLen);
    this.carryLen += part.length;
    // A line still open is too long once it holds more than the limit (a CR may belong to its CRLF).
    const open = this.carry[this.carryLen - 1] === 10 ? this.carryLen - 1 : this.carryLen;
    const body = open > 0 && this.carry[open - 1] === 13 ? open - 1 : open;
    if (body > MAX_LINE_BYTES) throw this.consumer.longLine();
  }

  /**
   * Complete lines in bytes[start, end): lines before the first one over the length limit are read,
   * then that one is refused, so the outcome is the same as when the file arrives in small pieces.
   */
  private checkedLines(bytes: Uint8Array, start: number, end: number): void {
    const long = end - start > MAX_LINE_BYTES ? firstLongLine(bytes, start, end) : -1;
    if (long < 0) {
      this.consumer.lines(bytes, start, end);
      return;
    }
    this.consumer.lines(bytes, start, long);
    if (!this.consumer.stopped()) throw this.consumer.longLine();
  }
}

/** Start of the first line in bytes[start, end) longer than MAX_LINE_BYTES (line ending excluded), or -1. */
export function firstLongLine(bytes: Uint8Array, start: number, end: number): number {
  // Any line longer than the limit covers a whole window of half the limit aligned at multiples of
  // it, so looking for a newline from each window start finds every candidate in a few searches.
  const half = MAX_LINE_BYTES >> 1;
  for (let w = start; w < end; w += half) {
    const nl = bytes.indexOf(10, w);
    const stop = nl < 0 || nl >= end ? end : nl;
    if (stop - w < half) continue;
    const lineStart = w === start ? start : Math.max(start, bytes.lastIndexOf(10, w - 1) + 1);
    const body =
      stop > lineStart && bytes[stop - 1] === 13 ? stop - 1 - lineStart : stop - lineStart;
    if (body > MAX_LINE_BYTES) return lineStart;
  }
  return -1;
}

/** A buffer with room for `more` bytes after its first `used`, grown by doubling. */
function grow(buf: Uint8Array, used: number, more: number): Uint8Array {
  if (used + more <= buf.length) return buf;
  const out = new Uint8Array(Math.max(used + more, buf.length * 2, 4096));
  out.set(buf.subarray(0, used));
  return out;
}
