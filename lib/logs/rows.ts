import { LogFormatError } from "../errors";
import { round } from "../signal/stats";
import {
  boundMap,
  throttleConversion,
  throttleUnitOf,
  type Layout,
  type Slot,
} from "./column-layout";
import type { ThrottleUnit } from "./columns";
import { formatSeconds } from "./format";
import { EMPTY_CELL, POW10, parseDecimal } from "./parse-number";
import { GAP_FACTOR, sampleRateOf } from "./sample-rate";
import {
  blockShapeOf,
  newSampleBlock,
  type Gap,
  type LogInfo,
  type LogSink,
  type ReadSummary,
  type SampleBlock,
} from "./types";

/**
 * The row core of the log reader: parses the rows after the header into raw slots, drops damaged
 * ones, decides the sample rate from the first rows, converts the units and hands blocks (split at
 * gaps) to the sink. A RowReader exists from the header row on; what exists only once the rate is
 * known (the LogInfo, the period, the output block) is a Stream made then.
 */

/** Rows held before the sample rate is decided from a line fit of their time stamps. */
export const PROBE_ROWS = 4096;
/** More incomplete rows than this fraction of all rows makes the file unreadable. */
const MAX_DROPPED_FRACTION = 0.05;
/** Gaps listed in a summary; more are counted (gapCount) but not listed, so memory stays flat. */
export const MAX_LISTED_GAPS = 1000;
/** Line numbers of dropped rows kept for the summary. */
const LISTED_DROPPED_LINES = 10;

export interface RowReaderOptions {
  /** Rows per block handed to the sink. */
  blockRows: number;
  metadata: Record<string, string>;
  /** Sentences for the columns guessed so far (the throttle unit may add one). */
  guesses: readonly string[];
  /** Line of the header row: the first row is the line after it. */
  headerLine: number;
}

/** What exists once the sample rate is known. */
interface Stream {
  info: LogInfo;
  /** Sample period in seconds, from the fit of the first rows' time stamps. */
  period: number;
  throttle: (v: number) => number;
  /** The converted block handed to the sink, reused. */
  out: SampleBlock;
}

/** A raw channel and the factor to heatcheck's unit. */
interface Scaled {
  src: Float64Array;
  scale: number;
}

export class RowReader {
  /** 1-based number of the last line read. */
  line: number;
  private readonly layout: Layout;
  private readonly sink: LogSink;
  private readonly blockRows: number;
  private readonly metadata: Record<string, string>;
  private readonly guesses: string[];
  private stream: Stream | null = null;

  // Raw rows of the current block: slot-major, values already in seconds / deg/s / rpm.
  private readonly raw: Float64Array[];
  private readonly rawTime: Float64Array;
  private readonly timeScale: number;
  // The raw channels with their factors, in block order.
  private readonly rawGyro: readonly Scaled[];
  private readonly rawThrottle: Float64Array | null;
  private readonly rawRpm: readonly Scaled[];
  private readonly rawSetpoint: readonly Scaled[];
  private readonly rawLines: Int32Array;
  /** Before the rate is known: damaged rows just before each held row (missing samples for the fit). */
  private readonly rawMissed: Int32Array;
  private rawCount = 0;

  private rawFirstTime = Number.NaN;
  private lastTime = Number.NaN;
  private samples = 0;
  private dropped = 0;
  private readonly droppedLines: number[] = [];
  /** Damaged rows (not repeated stamps) since the last row kept. */
  private missedSince = 0;
  /** Rows with more cells than the header names columns, and the first of them. */
  private wideRows = 0;
  private firstWide: { line: number; cells: number } | null = null;
  private readonly gaps: Gap[] = [];
  private gapCount = 0;
  private dataRows = 0;
  /** Time of the last row handed on, to see a gap between two blocks. */
  private prevEnd = 0;

  constructor(layout: Layout, sink: LogSink, options: RowReaderOptions) {
    this.layout = layout;
    this.sink = sink;
    this.blockRows = options.blockRows;
    this.metadata = options.metadata;
    this.guesses = [...options.guesses];
    this.line = options.headerLine;
    const size = this.capacity();
    // One buffer per slot; every slot belongs to exactly one channel of the layout.
    const raw = Array.from({ length: layout.slots }, () => new Float64Array(0));
    const rawOf = (c: { slot: number }) => (raw[c.slot] = new Float64Array(size));
    const scaled = (c: Slot): Scaled => ({ src: rawOf(c), scale: c.scale });
    this.rawTime = rawOf(layout.time);
    this.timeScale = layout.time.scale;
    this.rawGyro = layout.gyro.map(scaled);
    this.rawThrottle = layout.throttle ? rawOf(layout.throttle) : null;
    this.rawRpm = layout.rpm.map(scaled);
    this.rawSetpoint = layout.setpoint?.map(scaled) ?? [];
    this.raw = raw;
    this.rawLines = new Int32Array(size);
    this.rawMissed = new Int32Array(size);
  }

  /** Rows a block holds: the probe's rows before the rate is known, blockRows after. */
  private capacity(): number {
    return Math.max(this.blockRows, PROBE_ROWS);
  }

  /** Rows in bytes[start, end); bytes[end - 1] is a newline. */
  lines(bytes: Uint8Array, start: number, end: number): void {
    let pos = start;
    while (pos < end) {
      this.line++;
      pos = this.row(bytes, pos);
    }
  }

  /**
   * The end of the file: more than 5 % damaged rows rejects it, the rate is decided from the rows
   * held if there were fewer than the probe's, the last block is handed on, and the summary made.
   */
  finish(bytes: number): ReadSummary {
    if (this.dataRows === 0)
      throw new LogFormatError("the header is there but no sample rows follow it");
    this.checkDamage();
    const stream = this.stream ?? this.decideRate();
    this.flush(stream);
    return {
      info: stream.info,
      samples: this.samples,
      durationS: this.samples / stream.info.sampleRateHz,
      gaps: this.gaps,
      gapCount: this.gapCount,
      droppedRows: this.dropped,
      droppedLines: this.droppedLines,
      bytes,
    };
  }

  /** More than 5 % damaged rows rejects the file; rows with extra cells are told apart. */
  private checkDamage(): void {
    if (!(this.dropped > MAX_DROPPED_FRACTION * this.dataRows && this.dropped > 1)) return;
    const header = this.layout.headers.length;
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

  /** A damaged row: incomplete, an empty cell, or a cell count other than the header's. */
  private drop(line: number, damaged: boolean): void {
    this.dropped++;
    if (damaged) this.missedSince++;
    if (this.droppedLines.length < LISTED_DROPPED_LINES) this.droppedLines.push(line);
  }

  /**
   * Parses the row starting at `start` (the buffer holds whole lines, the last one ending in a
   * newline) and returns the index after its newline.
   */
  private row(bytes: Uint8Array, start: number): number {
    const raw = this.raw;
    const slotOf = this.layout.slotOfColumn;
    const slots = this.layout.slots;
    const columns = slotOf.length;
    const r = this.rawCount;
    let filled = 0;
    let empty = false;
    let extra = false;
    let column = 0;
    let i = start;
    // Hot loop: most cells are plain decimals ("-12.345"), parsed here in one pass over the bytes.
    // Anything else (exponent, spaces, quotes, garbage, empty) takes parseDecimal's careful path.
    // Reads stay before the buffer's last newline, so the `as number` casts cannot hide undefined.
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
          if (Number.isNaN(v)) throw this.badCell(bytes, cellStart, cellEnd, column);
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
    if (empty || filled < slots) {
      this.drop(this.line, true);
      return next;
    }
    const rawTime = this.rawTime;
    const t = rawTime[r] ?? 0;
    // The first stamp is subtracted before scaling: Unix-epoch µs stamps (≈ 1.8e15) stay exact
    // integers that way, while scaled first they would lose the digits of the step.
    if (Number.isNaN(this.rawFirstTime)) this.rawFirstTime = t;
    const time = (t - this.rawFirstTime) * this.timeScale;
    if (time < this.lastTime) {
      const col = this.layout.time.column;
      throw new LogFormatError(
        `time goes backwards (${formatSeconds(time)} after ${formatSeconds(this.lastTime)}); logs must be in time order`,
        { line: this.line, column: col + 1, columnName: this.layout.headers[col] },
      );
    }
    if (time === this.lastTime) {
      this.drop(this.line, false);
      return next;
    }
    this.lastTime = time;
    rawTime[r] = time;
    this.rawLines[r] = this.line;
    this.rawCount++;
    const stream = this.stream;
    if (!stream) {
      this.rawMissed[r] = this.missedSince;
      this.missedSince = 0;
      if (this.rawCount >= PROBE_ROWS) this.flush(this.decideRate());
    } else if (this.rawCount >= this.blockRows) {
      this.flush(stream);
    }
    return next;
  }

  private badCell(bytes: Uint8Array, s: number, e: number, column: number): LogFormatError {
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
      { line: this.line, column: column + 1, columnName: this.layout.headers[column] },
    );
  }

  /**
   * The sample rate from a line fit of the first rows' time stamps; an "auto" throttle unit is
   * told from their values. Makes the Stream and tells the sink the LogInfo.
   */
  private decideRate(): Stream {
    const layout = this.layout;
    const n = this.rawCount;
    const col = layout.time.column;
    const rate = sampleRateOf(this.rawTime.subarray(0, n), this.rawMissed.subarray(0, n), {
      column: col + 1,
      columnName: layout.headers[col],
    });
    let throttleUnit: ThrottleUnit = layout.throttle?.unit ?? "fraction";
    if (layout.throttle && this.rawThrottle && throttleUnit === "auto") {
      let max = -Infinity;
      for (const v of this.rawThrottle.subarray(0, n)) max = Math.max(max, v);
      throttleUnit = throttleUnitOf(max);
      const header = layout.headers[layout.throttle.column] ?? "throttle";
      this.guesses.push(
        `"${header}" throttle values read as ${throttleUnit} (largest of the first rows: ${round(max, 3)})`,
      );
    }
    const info: LogInfo = {
      metadata: this.metadata,
      headers: layout.headers,
      map: boundMap(layout, throttleUnit),
      guesses: this.guesses,
      sampleRateHz: rate,
      hasThrottle: layout.throttle !== null,
      motors: layout.rpm.map((m) => m.motor),
      hasSetpoint: layout.setpoint !== null,
    };
    this.sink.begin(info);
    this.stream = {
      info,
      period: 1 / rate,
      throttle: throttleConversion(throttleUnit),
      out: newSampleBlock(this.capacity(), blockShapeOf(info)),
    };
    return this.stream;
  }

  /** Converts the held raw rows, splits them at gaps and hands them to the sink. */
  private flush(stream: Stream): void {
    const n = this.rawCount;
    if (n === 0) return;
    const { out, throttle: throttleScale } = stream;
    const time = this.rawTime;
    const throttle = this.rawThrottle;
    const limit = GAP_FACTOR * stream.period;
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
        scaleAll(out.gyro, this.rawGyro, start, len);
        if (out.throttle && throttle) {
          for (let j = 0; j < len; j++) out.throttle[j] = throttleScale(throttle[start + j] ?? 0);
        }
        scaleAll(out.rpm, this.rawRpm, start, len);
        if (out.setpoint) scaleAll(out.setpoint, this.rawSetpoint, start, len);
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
}

/** dst[k][j] = src[k][start + j] · scale[k] for j < len, for each channel k. */
function scaleAll(
  dst: readonly Float64Array[],
  src: readonly Scaled[],
  start: number,
  len: number,
): void {
  dst.forEach((d, k) => {
    const s = src[k];
    if (!s) return;
    const { src: from, scale } = s;
    for (let j = 0; j < len; j++) d[j] = (from[start + j] ?? 0) * scale;
  });
}
