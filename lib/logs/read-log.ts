import { LimitExceededError, LogFormatError, isDomainError } from "../errors";
import {
  AXES,
  canonicalMap,
  channelKey,
  checkMap,
  proposeColumnMap,
  type ColumnMap,
  type ThrottleUnit,
} from "./columns";
import { round } from "../signal/stats";
import { EMPTY_CELL, POW10, parseDecimal } from "./parse-number";
import {
  MAX_LINE_BYTES,
  MAX_PREAMBLE_BYTES,
  metadataEntry,
  nonTextKind,
  separatorHint,
  splitHeader,
} from "./preamble";

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
 */

export const DEFAULT_MAX_LOG_BYTES = 512 * 1024 * 1024;
export const MIN_SAMPLE_RATE_HZ = 100;
export const MAX_SAMPLE_RATE_HZ = 50_000;
/** A time step larger than this many median steps splits the log. */
export const GAP_FACTOR = 2.5;
/** Rows held before the sample rate is decided from a line fit of their time stamps. */
const PROBE_ROWS = 4096;
const DEFAULT_BLOCK_ROWS = 8192;
/** More incomplete rows than this fraction of all rows makes the file unreadable. */
const MAX_DROPPED_FRACTION = 0.05;
const DEG_PER_RAD = 180 / Math.PI;

export interface ReadOptions {
  /** Explicit column map. Without one, canonical headers are used, else a proposed map. */
  map?: ColumnMap;
  /** When false, a file without canonical headers and without a map is rejected. Default true. */
  allowGuess?: boolean;
  /** Size limit in bytes, checked while streaming. Default 512 MiB. */
  maxBytes?: number;
  /** Rows per block handed to the sink. Default 8192. */
  blockRows?: number;
}

export interface LogInfo {
  metadata: Record<string, string>;
  headers: string[];
  map: ColumnMap;
  /** Plain sentences for every column the reader guessed (empty for canonical files). */
  guesses: string[];
  sampleRateHz: number;
  hasThrottle: boolean;
  /** Motor numbers (1-based) that have an rpm column, in block order. */
  motors: number[];
  hasSetpoint: boolean;
}

/** A run of rows. Arrays belong to the reader and are valid only during the sink call. */
export interface SampleBlock {
  length: number;
  /** Seconds from the log's own zero. */
  timeS: Float64Array;
  /** deg/s, in AXES order. */
  gyro: readonly [Float64Array, Float64Array, Float64Array];
  /** 0..1, or null when the log has no throttle column. */
  throttle: Float64Array | null;
  /** rev/min, one array per entry of LogInfo.motors. */
  rpm: readonly Float64Array[];
  /** deg/s in AXES order, or null. */
  setpoint: readonly [Float64Array, Float64Array, Float64Array] | null;
}

export interface Gap {
  /** Line of the first row after the gap. */
  line: number;
  atS: number;
  lengthS: number;
}

export interface LogSink {
  begin(info: LogInfo): void;
  block(block: SampleBlock): void;
  /** Called between the blocks before and after a gap. */
  gap(gap: Gap): void;
}

export interface ReadSummary {
  info: LogInfo;
  samples: number;
  durationS: number;
  /** The first MAX_LISTED_GAPS gaps. */
  gaps: Gap[];
  /** All gaps, listed or not. */
  gapCount: number;
  /** Rows skipped as damaged (a truncated last line, an empty cell, a cell count other than the header's, a repeated time stamp). */
  droppedRows: number;
  /** Line numbers of the first few dropped rows. */
  droppedLines: number[];
  bytes: number;
}

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

/** Column slots in a raw row. */
interface Layout {
  /** For every file column, the slot it fills, or -1 when unused. */
  slotOfColumn: Int32Array;
  slots: number;
  timeScale: number;
  gyroScale: number[];
  setpointScale: number[];
  rpmScale: number[];
  throttleUnit: ThrottleUnit;
  /** slot indices */
  time: number;
  gyro: number[];
  throttle: number;
  rpm: number[];
  setpoint: number[];
  headers: string[];
  map: ColumnMap;
}

/** What the head of a log holds, as found by a reader in head mode (see sniff.ts). */
export interface HeadFound {
  metadata: Record<string, string>;
  headers: string[];
  /** 1-based line of the header row. */
  line: number;
}

/** Gaps listed in a summary; more are counted (gapCount) but not listed, so memory stays flat. */
export const MAX_LISTED_GAPS = 1000;
/** Bytes looked at to tell what kind of file this is before reading it as lines. */
const KIND_PROBE_BYTES = 512;

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
  private line = 0;
  // The first bytes, held until the file's kind and its line ending are known.
  private started = false;
  private startBuf: Uint8Array = new Uint8Array(0);
  private startLen = 0;
  private startScanned = 0;
  /** Lines end in a lone CR (old Macintosh text): CRs are read as line feeds. */
  private crOnly = false;
  // The unfinished last line of the previous chunk, in a buffer that grows by doubling.
  private carry: Uint8Array = new Uint8Array(0);
  private carryLen = 0;
  private preambleBytes = 0;
  private metadata: Record<string, string> = {};
  private layout: Layout | null = null;
  private guesses: string[] = [];
  private info: LogInfo | null = null;

  // Raw rows of the current block: slot-major, values already in seconds / deg/s / rpm.
  private raw: Float64Array[] = [];
  private rawLines = new Int32Array(0);
  /** Before the rate is known: damaged rows just before each held row (missing samples for the fit). */
  private rawMissed = new Int32Array(0);
  private rawCount = 0;

  private rawFirstTime = Number.NaN;
  private lastTime = Number.NaN;
  /** Sample period in seconds, from the fit of the first rows' time stamps. */
  private period = Number.NaN;
  private samples = 0;
  private dropped = 0;
  private droppedLines: number[] = [];
  /** Damaged rows (not repeated stamps) since the last row kept. */
  private missedSince = 0;
  /** Rows with more cells than the header names columns, and the first of them. */
  private wideRows = 0;
  private firstWide: { line: number; cells: number } | null = null;
  private gaps: Gap[] = [];
  private gapCount = 0;
  private dataRows = 0;
  /** Time of the last row handed on, to see a gap between two blocks. */
  private prevEnd = 0;

  // Output block (converted), reused.
  private out: SampleBlock | null = null;

  constructor(sink: LogSink, options: ReadOptions = {}, headOnly = false) {
    this.sink = sink;
    this.options = options;
    this.maxBytes = options.maxBytes ?? DEFAULT_MAX_LOG_BYTES;
    this.blockRows = options.blockRows ?? DEFAULT_BLOCK_ROWS;
    this.headOnly = headOnly;
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
    if (this.started) this.feed(chunk);
    else this.hold(chunk, false);
    if (over) {
      throw new LimitExceededError(
        `the file is larger than the ${formatBytes(this.maxBytes)} limit; split the log or raise the limit`,
      );
    }
  }

  /** Decides the file's kind from the bytes pushed so far (for a head that is only a slice of a file). */
  settle(): void {
    if (!this.started) this.hold(new Uint8Array(0), true);
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
        const c = input[i] as number;
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
      if (this.head) return;
      pos = nl + 1;
    }
    const lastNl = chunk.lastIndexOf(10);
    if (lastNl < pos) {
      this.appendCarry(chunk.subarray(pos));
      return;
    }
    this.checkedLines(chunk, pos, lastNl + 1);
    if (lastNl + 1 < chunk.length && !this.head) this.appendCarry(chunk.subarray(lastNl + 1));
  }

  private appendCarry(part: Uint8Array): void {
    this.carry = grow(this.carry, this.carryLen, part.length);
    this.carry.set(part, this.carryLen);
    this.carryLen += part.length;
    // A line still open is too long once it holds more than the limit (a CR may belong to its CRLF).
    const open = this.carry[this.carryLen - 1] === 10 ? this.carryLen - 1 : this.carryLen;
    const body = open > 0 && this.carry[open - 1] === 13 ? open - 1 : open;
    if (body > MAX_LINE_BYTES) throw this.longLine(this.line + 1);
  }

  /** A line that never ends is not a CSV log (binary data, or a file with no newlines). */
  private longLine(line: number): LogFormatError {
    const what = this.layout ? "this is not a row of numbers" : "this does not look like a CSV log";
    return new LogFormatError(`the line is longer than ${formatBytes(MAX_LINE_BYTES)}: ${what}`, {
      line,
    });
  }

  /**
   * Complete lines in bytes[start, end): lines before the first one over the length limit are read,
   * then that one is refused, so the outcome is the same as when the file arrives in small pieces.
   */
  private checkedLines(bytes: Uint8Array, start: number, end: number): void {
    const long = end - start > MAX_LINE_BYTES ? firstLongLine(bytes, start, end) : -1;
    if (long < 0) {
      this.lines(bytes, start, end);
      return;
    }
    this.lines(bytes, start, long);
    if (!this.head) throw this.longLine(this.line + 1);
  }

  /** The end of the input: held bytes are read, and a last line without a line ending too. */
  private endOfInput(): void {
    if (!this.started) this.hold(new Uint8Array(0), true);
    if (this.carryLen > 0 && !this.head) {
      const last = new Uint8Array(this.carryLen + 1);
      last.set(this.carry.subarray(0, this.carryLen));
      last[this.carryLen] = 10;
      this.carryLen = 0;
      this.lines(last, 0, last.length);
    }
  }

  /** In head mode, at the end of the input: the head, or the reader's error for a file without one. */
  finishHead(): HeadFound {
    this.endOfInput();
    if (this.head) return this.head;
    this.finish();
    throw new LogFormatError(
      "no header row was found: after the # metadata lines, the first line must name the columns",
    );
  }

  finish(): ReadSummary {
    this.endOfInput();
    if (this.bytes === 0) throw new LogFormatError("the file is empty");
    if (!this.layout) {
      throw new LogFormatError(
        "no header row was found: after the # metadata lines, the first line must name the columns",
      );
    }
    if (this.dataRows === 0)
      throw new LogFormatError("the header is there but no sample rows follow it");
    this.checkDamage();
    if (!this.info) this.decideRate();
    this.flush();
    const info = this.info;
    if (!info)
      throw new LogFormatError("the header is there but no complete sample rows follow it");
    return {
      info,
      samples: this.samples,
      durationS: this.samples / info.sampleRateHz,
      gaps: this.gaps,
      gapCount: this.gapCount,
      droppedRows: this.dropped,
      droppedLines: this.droppedLines,
      bytes: this.bytes,
    };
  }

  /** More than 5 % damaged rows rejects the file; rows with extra cells are told apart. */
  private checkDamage(): void {
    if (!(this.dropped > MAX_DROPPED_FRACTION * this.dataRows && this.dropped > 1)) return;
    const header = this.layout?.headers.length ?? 0;
    if (this.firstWide && this.wideRows * 2 >= this.dropped) {
      throw new LogFormatError(
        `this row has ${this.firstWide.cells} cells but the header names ${header} columns, and so do ${this.wideRows} of ${this.dataRows} rows: the numbers probably use decimal commas (12,5) or thousands separators (21,050); write them as 12.5 and 21050`,
        { line: this.firstWide.line },
      );
    }
    throw new LogFormatError(
      `${this.dropped} of ${this.dataRows} rows were dropped as damaged (an empty or missing cell, a cell count other than the header's, or a repeated time stamp; first at line ${this.droppedLines[0] ?? "?"}); the file looks damaged`,
    );
  }

  /** Complete lines in bytes[start, end); bytes[end-1] is a newline. */
  private lines(bytes: Uint8Array, start: number, end: number): void {
    let pos = start;
    while (pos < end && this.layout) {
      this.line++;
      pos = this.row(bytes, pos, end);
    }
    while (pos < end && !this.head) {
      let eol = bytes.indexOf(10, pos);
      if (eol < 0 || eol >= end) eol = end;
      this.line++;
      let lineEnd = eol;
      if (lineEnd > pos && bytes[lineEnd - 1] === 13) lineEnd--;
      this.preambleLine(bytes, pos, lineEnd);
      this.preambleBytes += eol + 1 - pos;
      pos = eol + 1;
      // The header was found: the rest are rows.
      while (pos < end && this.layout) {
        this.line++;
        pos = this.row(bytes, pos, end);
      }
    }
  }

  private preambleLine(bytes: Uint8Array, start: number, end: number): void {
    if (this.preambleBytes >= MAX_PREAMBLE_BYTES) {
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
        {
          line: this.line,
        },
      );
    }
    const trimmed = text.trim();
    if (trimmed === "") return;
    if (trimmed.startsWith("#")) {
      const entry = metadataEntry(trimmed);
      if (entry) this.metadata[entry[0]] = entry[1];
      return;
    }
    this.header(text);
  }

  private header(text: string): void {
    const headers = splitHeader(text);
    if (headers.every((h) => h !== "" && Number.isFinite(Number(h)))) {
      throw new LogFormatError(
        "the first line holds numbers, not column names: add a header row such as time_us,gyro_roll,gyro_pitch,gyro_yaw",
        { line: this.line },
      );
    }
    this.headerFound = { metadata: this.metadata, headers, line: this.line };
    if (this.headOnly) {
      this.head = this.headerFound;
      return;
    }
    let map = this.options.map;
    if (!map) {
      map = canonicalMap(headers);
      if (!map) {
        const proposal = proposeColumnMap(headers);
        if (proposal.missing.length > 0 || this.options.allowGuess === false) {
          const need =
            proposal.missing.length > 0 ? proposal.missing.join(", ") : "time, roll, pitch, yaw";
          throw new LogFormatError(
            `no column for ${need}: name the columns time_us, gyro_roll, gyro_pitch, gyro_yaw, or give a column map${separatorHint(text)}`,
            { line: this.line },
          );
        }
        map = proposal.map;
        this.guesses = proposal.guesses;
      }
    }
    checkMap(map);
    this.layout = makeLayout(headers, map, this.line);
    const slots = this.layout.slots;
    const size = Math.max(this.blockRows, PROBE_ROWS);
    this.raw = Array.from({ length: slots }, () => new Float64Array(size));
    this.rawLines = new Int32Array(size);
    this.rawMissed = new Int32Array(size);
  }

  /** A damaged row: incomplete, an empty cell, or a cell count other than the header's. */
  private drop(line: number, damaged: boolean): void {
    this.dropped++;
    if (damaged) this.missedSince++;
    if (this.droppedLines.length < 10) this.droppedLines.push(line);
  }

  /**
   * Parses the row starting at `start` (the buffer holds whole lines up to `end`, which follows a
   * newline) and returns the index after its newline.
   */
  private row(bytes: Uint8Array, start: number, end: number): number {
    const layout = this.layout as Layout;
    const raw = this.raw;
    const slotOf = layout.slotOfColumn;
    const columns = slotOf.length;
    const r = this.rawCount;
    let filled = 0;
    let empty = false;
    let extra = false;
    let column = 0;
    let i = start;
    // Hot loop: most cells are plain decimals ("-12.345"), parsed here in one pass over the bytes.
    // Anything else (exponent, spaces, quotes, garbage, empty) takes parseDecimal's careful path.
    // Reads stay below `end`, inside the buffer, so the `as number` casts cannot hide undefined.
    let b = bytes[i] as number;
    if (b === 0x0a || (b === 0x0d && bytes[i + 1] === 0x0a)) {
      return b === 0x0a ? i + 1 : i + 2; // blank line
    }
    this.dataRows++;
    for (;;) {
      const cellStart = i;
      const slot = column < columns ? (slotOf[column] as number) : -1;
      if (slot < 0) {
        while (b !== 0x2c && b !== 0x0a) b = bytes[++i] as number;
        // A cell beyond the header's columns that holds something (not just a line's CR) shifts the row.
        if (column >= columns && i - cellStart > (b === 0x0a && bytes[i - 1] === 0x0d ? 1 : 0))
          extra = true;
      } else {
        let negative = false;
        if (b === 0x2d) {
          negative = true;
          b = bytes[++i] as number;
        }
        let mantissa = 0;
        let digits = 0;
        let scale = 0;
        while (b >= 0x30 && b <= 0x39) {
          mantissa = mantissa * 10 + (b - 0x30);
          digits++;
          b = bytes[++i] as number;
        }
        if (b === 0x2e) {
          b = bytes[++i] as number;
          while (b >= 0x30 && b <= 0x39) {
            mantissa = mantissa * 10 + (b - 0x30);
            digits++;
            scale++;
            b = bytes[++i] as number;
          }
        }
        let v: number;
        if (
          digits > 0 &&
          digits <= 15 &&
          (b === 0x2c || b === 0x0a || (b === 0x0d && bytes[i + 1] === 0x0a))
        ) {
          v = scale === 0 ? mantissa : mantissa / (POW10[scale] as number);
          if (negative) v = -v;
        } else {
          while (b !== 0x2c && b !== 0x0a) b = bytes[++i] as number;
          const cellEnd = b === 0x0a && bytes[i - 1] === 0x0d ? i - 1 : i;
          v = parseDecimal(bytes, cellStart, cellEnd);
          if (Number.isNaN(v)) throw this.badCell(bytes, cellStart, cellEnd, column, layout);
        }
        if (b === 0x0d) b = bytes[++i] as number;
        if (v === EMPTY_CELL) {
          empty = true;
        } else {
          (raw[slot] as Float64Array)[r] = v;
          filled++;
        }
      }
      column++;
      if (b === 0x0a) break;
      b = bytes[++i] as number; // past the comma
    }
    const next = i + 1;
    // Fewer cells, or more that hold something (empty trailing cells are a writer's habit, not a shift).
    if (column < columns || extra) {
      // Cells shifted: with more cells than columns, numbers were most likely written with commas.
      if (extra) {
        this.wideRows++;
        this.firstWide ??= { line: this.line, cells: column };
      }
      this.drop(this.line, true);
      return next;
    }
    if (empty || filled < layout.slots) {
      this.drop(this.line, true);
      return next;
    }
    const t = (raw[layout.time] as Float64Array)[r] ?? 0;
    // The first stamp is subtracted before scaling: Unix-epoch µs stamps (≈ 1.8e15) stay exact
    // integers that way, while scaled first they would lose the digits of the step.
    if (Number.isNaN(this.rawFirstTime)) this.rawFirstTime = t;
    const time = (t - this.rawFirstTime) * layout.timeScale;
    if (time < this.lastTime) {
      const col = slotColumn(layout, layout.time) ?? 0;
      throw new LogFormatError(
        `time goes backwards (${formatSeconds(time)} after ${formatSeconds(this.lastTime)}); logs must be in time order`,
        { line: this.line, column: col + 1, columnName: layout.headers[col] },
      );
    }
    if (time === this.lastTime) {
      this.drop(this.line, false);
      return next;
    }
    this.lastTime = time;
    (raw[layout.time] as Float64Array)[r] = time;
    this.rawLines[r] = this.line;
    this.rawCount++;
    if (!this.info) {
      this.rawMissed[r] = this.missedSince;
      this.missedSince = 0;
      if (this.rawCount >= PROBE_ROWS) {
        this.decideRate();
        this.flush();
      }
    } else if (this.rawCount >= this.blockRows) {
      this.flush();
    }
    return next;
  }

  private badCell(
    bytes: Uint8Array,
    s: number,
    e: number,
    column: number,
    layout: Layout,
  ): LogFormatError {
    let shown = "";
    for (let i = s; i < Math.min(e, s + 24); i++) {
      const b = bytes[i] ?? 0;
      shown += b >= 0x20 && b < 0x7f ? String.fromCharCode(b) : "?";
    }
    const binary = bytes.subarray(s, e).some((b) => b === 0 || (b < 0x20 && b !== 9));
    return new LogFormatError(
      binary
        ? "binary data where a number was expected"
        : `expected a number, found "${shown}${e - s > 24 ? "…" : ""}"`,
      { line: this.line, column: column + 1, columnName: layout.headers[column] },
    );
  }

  /** The sample rate from a line fit of the first rows' time stamps; the throttle scale is read too. */
  private decideRate(): void {
    const layout = this.layout as Layout;
    const n = this.rawCount;
    if (n < 2)
      throw new LogFormatError("fewer than two complete sample rows: no sample rate can be told");
    const time = (this.raw[layout.time] as Float64Array).subarray(0, n);
    const period = fitSamplePeriod(time, this.rawMissed.subarray(0, n));
    // Rounded to 9 significant digits, far finer than 4096 stamps resolve: exact rates stay exact.
    const rate = Number((1 / period).toPrecision(9));
    if (!(rate >= MIN_SAMPLE_RATE_HZ && rate <= MAX_SAMPLE_RATE_HZ)) {
      const col = slotColumn(layout, layout.time) ?? 0;
      throw new LogFormatError(
        `the time column gives ${formatRate(rate)}, outside ${MIN_SAMPLE_RATE_HZ} Hz – ${MAX_SAMPLE_RATE_HZ / 1000} kHz; check its unit (µs, ms or s)`,
        { column: col + 1, columnName: layout.headers[col] },
      );
    }
    this.period = 1 / rate;
    if (layout.throttle >= 0 && layout.throttleUnit === "auto") {
      const thr = (this.raw[layout.throttle] as Float64Array).subarray(0, n);
      let max = -Infinity;
      for (const v of thr) max = Math.max(max, v);
      const unit: ThrottleUnit =
        max <= 1.0001 ? "fraction" : max <= 100.01 ? "percent" : "pulse-us";
      layout.throttleUnit = unit;
      const header = layout.headers[slotColumn(layout, layout.throttle) ?? 0] ?? "throttle";
      this.guesses.push(
        `"${header}" throttle values read as ${unit} (largest of the first rows: ${round(max, 3)})`,
      );
    }
    this.info = {
      metadata: this.metadata,
      headers: layout.headers,
      map: this.boundMap(),
      guesses: this.guesses,
      sampleRateHz: rate,
      hasThrottle: layout.throttle >= 0,
      motors: this.rpmMotorNumbers(),
      hasSetpoint: layout.setpoint.length === 3,
    };
    this.sink.begin(this.info);
  }

  private boundMap(): ColumnMap {
    const layout = this.layout as Layout;
    return layout.map.map((b) =>
      b.channel.kind === "throttle"
        ? { header: b.header, channel: { kind: "throttle", unit: layout.throttleUnit } }
        : b,
    );
  }

  /** Motor numbers in slot order (makeLayout binds rpm columns in motor order). */
  private rpmMotorNumbers(): number[] {
    const layout = this.layout as Layout;
    return layout.map
      .flatMap((b) => (b.channel.kind === "rpm" ? [b.channel.motor] : []))
      .sort((a, b) => a - b);
  }

  /** Converts the held raw rows, splits them at gaps and hands them to the sink. */
  private flush(): void {
    const n = this.rawCount;
    if (n === 0) return;
    const layout = this.layout as Layout;
    const info = this.info as LogInfo;
    const out = this.outputBlock(info);
    const raw = this.raw;
    const time = raw[layout.time] as Float64Array;
    const limit = GAP_FACTOR * this.period;
    const throttleScale = throttleConversion(layout.throttleUnit);
    let start = 0;
    for (let i = 0; i <= n; i++) {
      const isGap = i < n && i > 0 ? (time[i] ?? 0) - (time[i - 1] ?? 0) > limit : false;
      const crossesBlocks =
        i === 0 && n > 0 && this.samples > 0 && (time[0] ?? 0) - this.prevEnd > limit;
      if (crossesBlocks) this.emitGap(this.prevEnd, time[0] ?? 0, this.rawLines[0] ?? 0);
      if (i < n && !isGap) continue;
      const len = i - start;
      if (len > 0) {
        out.length = len;
        out.timeS.set(time.subarray(start, i));
        layout.gyro.forEach((slot, a) => {
          const src = raw[slot] as Float64Array;
          const dst = out.gyro[a] as Float64Array;
          const k = layout.gyroScale[a] ?? 1;
          for (let j = 0; j < len; j++) dst[j] = (src[start + j] ?? 0) * k;
        });
        if (out.throttle) {
          const src = raw[layout.throttle] as Float64Array;
          for (let j = 0; j < len; j++) out.throttle[j] = throttleScale(src[start + j] ?? 0);
        }
        layout.rpm.forEach((slot, m) => {
          const src = raw[slot] as Float64Array;
          const dst = out.rpm[m] as Float64Array;
          const k = layout.rpmScale[m] ?? 1;
          for (let j = 0; j < len; j++) dst[j] = (src[start + j] ?? 0) * k;
        });
        if (out.setpoint) {
          layout.setpoint.forEach((slot, a) => {
            const src = raw[slot] as Float64Array;
            const dst = out.setpoint?.[a] as Float64Array;
            const k = layout.setpointScale[a] ?? 1;
            for (let j = 0; j < len; j++) dst[j] = (src[start + j] ?? 0) * k;
          });
        }
        this.samples += len;
        this.sink.block(out);
      }
      if (isGap) this.emitGap(time[i - 1] ?? 0, time[i] ?? 0, this.rawLines[i] ?? 0);
      start = i;
    }
    this.prevEnd = time[n - 1] ?? 0;
    this.rawCount = 0;
  }

  private emitGap(before: number, after: number, line: number): void {
    const gap: Gap = { line, atS: round(before, 6), lengthS: round(after - before, 6) };
    this.gapCount++;
    if (this.gaps.length < MAX_LISTED_GAPS) this.gaps.push(gap);
    this.sink.gap(gap);
  }

  private outputBlock(info: LogInfo): SampleBlock {
    if (this.out) return this.out;
    const size = Math.max(this.blockRows, PROBE_ROWS);
    const layout = this.layout as Layout;
    const make = () => new Float64Array(size);
    this.out = {
      length: 0,
      timeS: make(),
      gyro: [make(), make(), make()],
      throttle: info.hasThrottle ? make() : null,
      rpm: layout.rpm.map(make),
      setpoint: info.hasSetpoint ? [make(), make(), make()] : null,
    };
    return this.out;
  }
}

/**
 * The sample period (s) from time stamps (s, from the first row), by least squares: the stamps are
 * cut into runs at gaps (steps over GAP_FACTOR median steps), and one line slope is fitted to all
 * runs at once, each run with its own intercept (the pooled within-run regression of time on sample
 * number). A least-squares slope over n stamps averages their jitter down by about n^1.5, where the
 * median step keeps the jitter and, on integer-µs stamps, the rounding of one step. Sample numbers
 * advance by one per row, and also over damaged rows that left a hole (a step of about two periods).
 */
export function fitSamplePeriod(timeS: Float64Array, missedBefore: Int32Array): number {
  const n = timeS.length;
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) steps[i - 1] = (timeS[i] ?? 0) - (timeS[i - 1] ?? 0);
  steps.sort();
  const median = steps[(n - 2) >> 1] ?? 0;
  if (!(median > 0)) return median;
  const limit = GAP_FACTOR * median;
  let sxx = 0;
  let sxy = 0;
  // Per run: sums of x, y, x², xy relative to the run's first point, to keep the sums small.
  let count = 0;
  let sx = 0;
  let sy = 0;
  let sxxRun = 0;
  let sxyRun = 0;
  let x = 0;
  let x0 = 0;
  let y0 = 0;
  const closeRun = () => {
    if (count > 1) {
      sxx += sxxRun - (sx * sx) / count;
      sxy += sxyRun - (sx * sy) / count;
    }
  };
  for (let i = 0; i < n; i++) {
    const t = timeS[i] ?? 0;
    const step = i > 0 ? t - (timeS[i - 1] ?? 0) : Infinity;
    if (step > limit) {
      closeRun();
      count = 0;
      sx = sy = sxxRun = sxyRun = 0;
      x = 0;
      x0 = 0;
      y0 = t;
    } else {
      const holes = Math.min(missedBefore[i] ?? 0, Math.max(0, Math.round(step / median) - 1));
      x += 1 + holes;
    }
    const dx = x - x0;
    const dy = t - y0;
    count++;
    sx += dx;
    sy += dy;
    sxxRun += dx * dx;
    sxyRun += dx * dy;
  }
  closeRun();
  return sxx > 0 ? sxy / sxx : median;
}

/** Start of the first line in bytes[start, end) longer than MAX_LINE_BYTES (line ending excluded), or -1. */
function firstLongLine(bytes: Uint8Array, start: number, end: number): number {
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

function makeLayout(headers: string[], map: ColumnMap, line: number): Layout {
  // A partial set of setpoint columns is of no use: those columns are ignored.
  const setpoints = map.filter((b) => b.channel.kind === "setpoint").length;
  const used = setpoints === 3 ? map : map.filter((b) => b.channel.kind !== "setpoint");
  const slotOfColumn = new Int32Array(headers.length).fill(-1);
  let slots = 0;
  const layout: Layout = {
    slotOfColumn,
    slots: 0,
    timeScale: 1,
    gyroScale: [1, 1, 1],
    setpointScale: [1, 1, 1],
    rpmScale: [],
    throttleUnit: "fraction",
    time: -1,
    gyro: [-1, -1, -1],
    throttle: -1,
    rpm: [],
    setpoint: [],
    headers,
    map: used,
  };
  const setpointSlots: number[] = [-1, -1, -1];
  const ordered = [...used].sort((a, b) => motorOrder(a) - motorOrder(b));
  for (const binding of ordered) {
    const column = headers.indexOf(binding.header);
    if (column < 0) {
      throw new LogFormatError(
        `the map names a column "${binding.header}" for ${channelKey(binding.channel)}, but the header has no such column`,
        { line },
      );
    }
    const slot = slots++;
    slotOfColumn[column] = slot;
    const c = binding.channel;
    switch (c.kind) {
      case "time":
        layout.time = slot;
        layout.timeScale = c.unit === "us" ? 1e-6 : c.unit === "ms" ? 1e-3 : 1;
        break;
      case "gyro": {
        const a = AXES.indexOf(c.axis);
        layout.gyro[a] = slot;
        layout.gyroScale[a] = c.unit === "rad/s" ? DEG_PER_RAD : 1;
        break;
      }
      case "setpoint": {
        const a = AXES.indexOf(c.axis);
        setpointSlots[a] = slot;
        layout.setpointScale[a] = c.unit === "rad/s" ? DEG_PER_RAD : 1;
        break;
      }
      case "throttle":
        layout.throttle = slot;
        layout.throttleUnit = c.unit;
        break;
      case "rpm":
        layout.rpm.push(slot);
        layout.rpmScale.push(c.unit === "hz" ? 60 : 1);
        break;
    }
  }
  layout.slots = slots;
  if (setpointSlots.every((x) => x >= 0)) layout.setpoint = setpointSlots;
  return layout;
}

function motorOrder(b: ColumnMap[number]): number {
  return b.channel.kind === "rpm" ? 100 + b.channel.motor : 0;
}

function slotColumn(layout: Layout, slot: number): number | undefined {
  const i = layout.slotOfColumn.indexOf(slot);
  return i >= 0 ? i : undefined;
}

function throttleConversion(unit: ThrottleUnit): (v: number) => number {
  switch (unit) {
    case "percent":
      return (v) => v / 100;
    case "pulse-us":
      return (v) => (v - 1000) / 1000;
    default:
      return (v) => v;
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a, 0);
  out.set(b, a.length);
  return out;
}

function formatSeconds(s: number): string {
  return `${round(s, 6)} s`;
}

function formatRate(hz: number): string {
  if (!Number.isFinite(hz)) return "no usable time step";
  return hz >= 1000 ? `${round(hz / 1000, 3)} kHz` : `${round(hz, 3)} Hz`;
}

export function formatBytes(n: number): string {
  if (n >= 1024 ** 3) return `${round(n / 1024 ** 3, 1)} GiB`;
  if (n >= 1024 ** 2) return `${round(n / 1024 ** 2, 1)} MiB`;
  if (n >= 1024) return `${round(n / 1024, 1)} KiB`;
  return `${n} bytes`;
}
