import { LimitExceededError, LogFormatError, isDomainError } from "../errors";
import { chooseMap, makeLayout } from "./column-layout";
import { formatBytes } from "./format";
import { LineFramer } from "./line-framer";
import { MAX_LINE_BYTES, Preamble, type HeaderLine } from "./preamble";
import { RowReader } from "./rows";
import type { HeadFound, LogSink, ReadOptions, ReadSummary } from "./types";

/**
 * Streaming reader for heatcheck's CSV log format:
 *
 *     # airframe: Kite-03
 *     # flown_at: 2026-11-28T14:05:00Z
 *     time_us,gyro_roll,gyro_pitch,gyro_yaw,throttle,rpm_1,…
 *     0,1.25,-0.5,0.1,0.42,21000,…
 *
 * Bytes are parsed as they arrive; only one block of rows is held at a time, so memory does not
 * grow with the file. The sink receives rows in blocks that never straddle a time gap.
 *
 * The reader is four parts: line framing (line-framer.ts), the lines before the header
 * (preamble.ts), the column layout and unit conversion (column-layout.ts) and the row core
 * (rows.ts, with the rate fit in sample-rate.ts). This module joins them and is the public API.
 */

export type {
  BlockShape,
  Gap,
  HeadFound,
  LogInfo,
  LogSink,
  ReadOptions,
  ReadSummary,
  SampleBlock,
} from "./types";
export { blockShapeOf, newSampleBlock } from "./types";
export { formatBytes } from "./format";
export { GAP_FACTOR, MAX_SAMPLE_RATE_HZ, MIN_SAMPLE_RATE_HZ } from "./sample-rate";
export { MAX_LISTED_GAPS } from "./rows";

export const DEFAULT_MAX_LOG_BYTES = 512 * 1024 * 1024;
const DEFAULT_BLOCK_ROWS = 8192;
const NO_HEADER =
  "no header row was found: after the # metadata lines, the first line must name the columns";

/** Reads a whole log from a byte stream into the sink. Throws LogFormatError or LimitExceededError. */
export async function readLog(
  source: AsyncIterable<Uint8Array>,
  sink: LogSink,
  options: ReadOptions = {},
): Promise<ReadSummary> {
  const reader = new LogReader(sink, options);
  const chunks = source[Symbol.asyncIterator]();
  for (;;) {
    const next = await nextChunk(chunks);
    if (next.done) break;
    reader.push(next.value);
  }
  return reader.finish();
}

/** The next chunk of a byte stream; a stream that fails (a file removed mid-read, a dropped upload) is an unreadable file. */
export async function nextChunk(
  chunks: AsyncIterator<Uint8Array>,
): Promise<IteratorResult<Uint8Array>> {
  try {
    return await chunks.next();
  } catch (e) {
    if (isDomainError(e)) throw e;
    throw new LogFormatError(
      `the file could not be read (${e instanceof Error ? e.message : String(e)})`,
    );
  }
}

/**
 * The reader as a push parser: give it the file's bytes in chunks of any size with push(), then call
 * finish(). The outcome (rows, gaps, errors and the line and column they name) does not depend on
 * where the chunks are cut. With `headOnly`, it stops at the header row and keeps it in `head`.
 */
export class LogReader {
  private readonly sink: LogSink;
  private readonly options: ReadOptions;
  private readonly maxBytes: number;
  private readonly blockRows: number;
  private readonly headOnly: boolean;
  /** Set in head mode once the header row was read; later bytes are ignored. */
  head: HeadFound | null = null;
  /**
   * Set in either mode once the header row was read: an upload that is checked while it streams
   * can match the airframe from the metadata before the last byte arrives.
   */
  headerFound: HeadFound | null = null;

  private bytes = 0;
  private readonly framer: LineFramer;
  private readonly preamble = new Preamble();
  /** Made when the header row arrives (not in head mode). */
  private rows: RowReader | null = null;

  constructor(sink: LogSink, options: ReadOptions = {}, headOnly = false) {
    this.sink = sink;
    this.options = options;
    this.maxBytes = options.maxBytes ?? DEFAULT_MAX_LOG_BYTES;
    this.blockRows = options.blockRows ?? DEFAULT_BLOCK_ROWS;
    this.headOnly = headOnly;
    this.framer = new LineFramer({
      lines: (bytes, start, end) => this.lines(bytes, start, end),
      stopped: () => this.head !== null,
      longLine: () => this.longLine(),
    });
  }

  push(input: Uint8Array): void {
    if (input.length === 0 || this.head) return;
    // Node hands Buffers, tests hand Uint8Arrays: one element type keeps the hot loop monomorphic.
    let chunk =
      input.constructor === Uint8Array
        ? input
        : new Uint8Array(input.buffer, input.byteOffset, input.length);
    // Bytes up to the limit are read first, so the limit is met at the same byte however the file is cut.
    const over = this.bytes + chunk.length > this.maxBytes;
    if (over) chunk = chunk.subarray(0, Math.max(0, this.maxBytes - this.bytes));
    this.bytes += chunk.length;
    this.framer.push(chunk);
    if (over) {
      throw new LimitExceededError(
        `the file is larger than the ${formatBytes(this.maxBytes)} limit; split the log or raise the limit`,
      );
    }
  }

  /** Decides the file's kind from the bytes pushed so far (for a head that is only a slice of a file). */
  settle(): void {
    this.framer.settle();
  }

  /** In head mode, at the end of the input: the head, or the reader's error for a file without one. */
  finishHead(): HeadFound {
    this.framer.end();
    if (this.head) return this.head;
    this.finish();
    throw new LogFormatError(NO_HEADER);
  }

  finish(): ReadSummary {
    this.framer.end();
    if (this.bytes === 0) throw new LogFormatError("the file is empty");
    if (!this.rows) throw new LogFormatError(NO_HEADER);
    return this.rows.finish(this.bytes);
  }

  /** 1-based number of the last line read. */
  private get line(): number {
    return this.rows ? this.rows.line : this.preamble.line;
  }

  /** A line that never ends is not a CSV log (binary data, or a file with no newlines). */
  private longLine(): LogFormatError {
    const what = this.rows ? "this is not a row of numbers" : "this does not look like a CSV log";
    return new LogFormatError(`the line is longer than ${formatBytes(MAX_LINE_BYTES)}: ${what}`, {
      line: this.line + 1,
    });
  }

  /** Complete lines in bytes[start, end); bytes[end-1] is a newline. */
  private lines(bytes: Uint8Array, start: number, end: number): void {
    let pos = start;
    while (pos < end && !this.rows && !this.head) {
      pos = this.preamble.read(bytes, pos, end);
      const found = this.preamble.found;
      if (found) this.header(found);
    }
    if (pos < end && this.rows) this.rows.lines(bytes, pos, end);
  }

  /** The header row arrived: in head mode the head is kept, else the layout and the row core are made. */
  private header(found: HeaderLine): void {
    const { headers, line } = found.head;
    this.headerFound = found.head;
    if (this.headOnly) {
      this.head = found.head;
      return;
    }
    const { map, guesses } = chooseMap(headers, found.text, this.options, line);
    const layout = makeLayout(headers, map, line);
    this.rows = new RowReader(layout, this.sink, {
      blockRows: this.blockRows,
      metadata: this.preamble.metadata,
      guesses,
      headerLine: line,
    });
  }
}
