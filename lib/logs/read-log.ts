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
/** Rows held before the sample rate is decided from their median time step. */
const PROBE_ROWS = 4096;
const DEFAULT_BLOCK_ROWS = 8192;
const MAX_PREAMBLE_LINE = 64 * 1024;
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
  gaps: Gap[];
  /** Rows skipped as incomplete (a truncated last line, an empty cell, a repeated time stamp). */
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
  const parser = new LogParser(sink, options);
  const chunks = source[Symbol.asyncIterator]();
  for (;;) {
    let next: IteratorResult<Uint8Array>;
    try {
      next = await chunks.next();
    } catch (e) {
      // The stream itself failed (a file removed mid-read, a dropped upload): the file is unreadable.
      if (isDomainError(e)) throw e;
      throw new LogFormatError(`the file could not be read (${e instanceof Error ? e.message : String(e)})`);
    }
    if (next.done) break;
    parser.push(next.value);
  }
  return parser.finish();
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

class LogParser {
  private readonly sink: LogSink;
  private readonly options: ReadOptions;
  private readonly maxBytes: number;
  private readonly blockRows: number;

  private bytes = 0;
  private line = 0;
  private carry: Uint8Array | null = null;
  private metadata: Record<string, string> = {};
  private layout: Layout | null = null;
  private guesses: string[] = [];
  private info: LogInfo | null = null;

  // Raw rows of the current block: slot-major, values already in seconds / deg/s / rpm.
  private raw: Float64Array[] = [];
  private rawLines = new Int32Array(0);
  private rawCount = 0;

  private lastTime = Number.NaN;
  private firstTime = Number.NaN;
  private medianStep = Number.NaN;
  private samples = 0;
  private dropped = 0;
  private droppedLines: number[] = [];
  private gaps: Gap[] = [];
  private dataRows = 0;
  /** Time of the last row handed on, to see a gap between two blocks. */
  private prevEnd = 0;

  // Output block (converted), reused.
  private out: SampleBlock | null = null;

  constructor(sink: LogSink, options: ReadOptions) {
    this.sink = sink;
    this.options = options;
    this.maxBytes = options.maxBytes ?? DEFAULT_MAX_LOG_BYTES;
    this.blockRows = options.blockRows ?? DEFAULT_BLOCK_ROWS;
  }

  push(input: Uint8Array): void {
    if (input.length === 0) return;
    // Node hands Buffers, tests hand Uint8Arrays: one element type keeps the hot loop monomorphic.
    const chunk = input.constructor === Uint8Array ? input : new Uint8Array(input.buffer, input.byteOffset, input.length);
    this.bytes += chunk.length;
    if (this.bytes > this.maxBytes) {
      throw new LimitExceededError(
        `the file is larger than the ${formatBytes(this.maxBytes)} limit; split the log or raise the limit`,
      );
    }
    let pos = 0;
    if (this.carry) {
      const nl = chunk.indexOf(10);
      if (nl < 0) {
        this.carry = concat(this.carry, chunk);
        this.checkCarry();
        return;
      }
      const joined = concat(this.carry, chunk.subarray(0, nl + 1));
      this.carry = null;
      this.lines(joined, 0, joined.length);
      pos = nl + 1;
    }
    const lastNl = chunk.lastIndexOf(10);
    if (lastNl < pos) {
      this.carry = chunk.slice(pos);
      this.checkCarry();
      return;
    }
    this.lines(chunk, pos, lastNl + 1);
    if (lastNl + 1 < chunk.length) {
      this.carry = chunk.slice(lastNl + 1);
      this.checkCarry();
    }
  }

  finish(): ReadSummary {
    if (this.carry && this.carry.length > 0) {
      const last = concat(this.carry, new Uint8Array([10]));
      this.carry = null;
      this.lines(last, 0, last.length);
    }
    if (this.bytes === 0) throw new LogFormatError("the file is empty");
    if (!this.layout) {
      throw new LogFormatError(
        "no header row was found: after the # metadata lines, the first line must name the columns",
      );
    }
    if (this.dataRows === 0) throw new LogFormatError("the header is there but no sample rows follow it");
    if (!this.info) this.decideRate();
    this.flush();
    const info = this.info;
    if (!info) throw new LogFormatError("the header is there but no complete sample rows follow it");
    if (this.dropped > MAX_DROPPED_FRACTION * this.dataRows && this.dropped > 1) {
      throw new LogFormatError(
        `${this.dropped} of ${this.dataRows} rows are incomplete (first at line ${this.droppedLines[0] ?? "?"}); the file looks damaged`,
      );
    }
    return {
      info,
      samples: this.samples,
      durationS: this.samples / info.sampleRateHz,
      gaps: this.gaps,
      droppedRows: this.dropped,
      droppedLines: this.droppedLines,
      bytes: this.bytes,
    };
  }

  /** A line that never ends is not a CSV log (binary data, or a file with no newlines). */
  private checkCarry(): void {
    if (!this.carry || this.carry.length <= MAX_PREAMBLE_LINE) return;
    const what = this.layout ? "this is not a row of numbers" : "this does not look like a CSV log";
    throw new LogFormatError(`line ${this.line + 1} is longer than ${MAX_PREAMBLE_LINE / 1024} KiB: ${what}`);
  }

  /** Complete lines in bytes[start, end); bytes[end-1] is a newline. */
  private lines(bytes: Uint8Array, start: number, end: number): void {
    let pos = start;
    while (pos < end && this.layout) {
      this.line++;
      pos = this.row(bytes, pos, end);
    }
    while (pos < end) {
      let eol = bytes.indexOf(10, pos);
      if (eol < 0 || eol >= end) eol = end;
      this.line++;
      let lineEnd = eol;
      if (lineEnd > pos && bytes[lineEnd - 1] === 13) lineEnd--;
      this.preambleLine(bytes, pos, lineEnd);
      pos = eol + 1;
      // The header was found: the rest are rows.
      while (pos < end && this.layout) {
        this.line++;
        pos = this.row(bytes, pos, end);
      }
    }
  }

  private preambleLine(bytes: Uint8Array, start: number, end: number): void {
    for (let i = start; i < end; i++) {
      const b = bytes[i] ?? 0;
      if (b === 0 || (b < 0x20 && b !== 0x09)) {
        throw new LogFormatError("the file holds binary data, not CSV text", { line: this.line });
      }
    }
    const text = new TextDecoder("utf-8", { fatal: false }).decode(bytes.subarray(start, end)).replace(/^\uFEFF/, "");
    if (text.includes("\uFFFD")) {
      throw new LogFormatError("the file holds binary data or an unknown text encoding, not UTF-8 CSV", {
        line: this.line,
      });
    }
    const trimmed = text.trim();
    if (trimmed === "") return;
    if (trimmed.startsWith("#")) {
      const m = /^#\s*([A-Za-z0-9_.-]+)\s*:\s*(.*)$/.exec(trimmed);
      if (m?.[1] !== undefined) this.metadata[m[1].toLowerCase()] = (m[2] ?? "").trim();
      return;
    }
    this.header(text);
  }

  private header(text: string): void {
    const headers = text.split(",").map((h) => h.trim().replace(/^"(.*)"$/, "$1"));
    if (headers.every((h) => h !== "" && Number.isFinite(Number(h)))) {
      throw new LogFormatError(
        "the first line holds numbers, not column names: add a header row such as time_us,gyro_roll,gyro_pitch,gyro_yaw",
        { line: this.line },
      );
    }
    let map = this.options.map;
    if (!map) {
      map = canonicalMap(headers);
      if (!map) {
        const proposal = proposeColumnMap(headers);
        if (proposal.missing.length > 0 || this.options.allowGuess === false) {
          const need = proposal.missing.length > 0 ? proposal.missing.join(", ") : "time, roll, pitch, yaw";
          throw new LogFormatError(
            `no column for ${need}: name the columns time_us, gyro_roll, gyro_pitch, gyro_yaw, or give a column map`,
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
    this.raw = Array.from({ length: slots }, () => new Float64Array(Math.max(this.blockRows, PROBE_ROWS)));
    this.rawLines = new Int32Array(Math.max(this.blockRows, PROBE_ROWS));
  }

  private drop(line: number): void {
    this.dropped++;
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
        if (digits > 0 && digits <= 15 && (b === 0x2c || b === 0x0a || (b === 0x0d && bytes[i + 1] === 0x0a))) {
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
    if (empty || filled < layout.slots) {
      this.drop(this.line);
      return next;
    }
    const t = (raw[layout.time] as Float64Array)[r] ?? 0;
    const time = t * layout.timeScale;
    if (time < this.lastTime) {
      throw new LogFormatError(
        `time goes backwards (${formatSeconds(time)} after ${formatSeconds(this.lastTime)}); logs must be in time order`,
        { line: this.line, column: (slotColumn(layout, layout.time) ?? 0) + 1, columnName: layout.headers[slotColumn(layout, layout.time) ?? 0] },
      );
    }
    if (time === this.lastTime) {
      this.drop(this.line);
      return next;
    }
    if (Number.isNaN(this.firstTime)) this.firstTime = time;
    this.lastTime = time;
    (raw[layout.time] as Float64Array)[r] = time - this.firstTime;
    this.rawLines[r] = this.line;
    this.rawCount++;
    if (!this.info) {
      if (this.rawCount >= PROBE_ROWS) {
        this.decideRate();
        this.flush();
      }
    } else if (this.rawCount >= this.blockRows) {
      this.flush();
    }
    return next;
  }

  private badCell(bytes: Uint8Array, s: number, e: number, column: number, layout: Layout): LogFormatError {
    let shown = "";
    for (let i = s; i < Math.min(e, s + 24); i++) {
      const b = bytes[i] ?? 0;
      shown += b >= 0x20 && b < 0x7f ? String.fromCharCode(b) : "?";
    }
    const binary = bytes.subarray(s, e).some((b) => b === 0 || (b < 0x20 && b !== 9));
    return new LogFormatError(
      binary ? "binary data where a number was expected" : `expected a number, found "${shown}${e - s > 24 ? "…" : ""}"`,
      { line: this.line, column: column + 1, columnName: layout.headers[column] },
    );
  }

  /** Median time step of the probe rows gives the sample rate; the throttle scale is read too. */
  private decideRate(): void {
    const layout = this.layout as Layout;
    const n = this.rawCount;
    if (n < 2) throw new LogFormatError("fewer than two complete sample rows: no sample rate can be told");
    const time = this.raw[layout.time] as Float64Array;
    const steps = new Float64Array(n - 1);
    for (let i = 1; i < n; i++) steps[i - 1] = (time[i] ?? 0) - (time[i - 1] ?? 0);
    steps.sort();
    const median = steps[(n - 1) >> 1] ?? 0;
    const rate = 1 / median;
    if (!(rate >= MIN_SAMPLE_RATE_HZ && rate <= MAX_SAMPLE_RATE_HZ)) {
      const col = slotColumn(layout, layout.time) ?? 0;
      throw new LogFormatError(
        `the time column gives ${formatRate(rate)}, outside ${MIN_SAMPLE_RATE_HZ} Hz – ${MAX_SAMPLE_RATE_HZ / 1000} kHz; check its unit (µs, ms or s)`,
        { column: col + 1, columnName: layout.headers[col] },
      );
    }
    this.medianStep = median;
    if (layout.throttle >= 0 && layout.throttleUnit === "auto") {
      const thr = (this.raw[layout.throttle] as Float64Array).subarray(0, n);
      let max = -Infinity;
      for (const v of thr) max = Math.max(max, v);
      const unit: ThrottleUnit = max <= 1.0001 ? "fraction" : max <= 100.01 ? "percent" : "pulse-us";
      layout.throttleUnit = unit;
      const header = layout.headers[slotColumn(layout, layout.throttle) ?? 0] ?? "throttle";
      this.guesses.push(`"${header}" throttle values read as ${unit} (largest of the first rows: ${round(max, 3)})`);
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
      b.channel.kind === "throttle" ? { header: b.header, channel: { kind: "throttle", unit: layout.throttleUnit } } : b,
    );
  }

  /** Motor numbers in slot order (makeLayout binds rpm columns in motor order). */
  private rpmMotorNumbers(): number[] {
    const layout = this.layout as Layout;
    return layout.map.flatMap((b) => (b.channel.kind === "rpm" ? [b.channel.motor] : [])).sort((a, b) => a - b);
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
    const limit = GAP_FACTOR * this.medianStep;
    const throttleScale = throttleConversion(layout.throttleUnit);
    let start = 0;
    for (let i = 0; i <= n; i++) {
      const isGap = i < n && i > 0 ? (time[i] ?? 0) - (time[i - 1] ?? 0) > limit : false;
      const crossesBlocks = i === 0 && n > 0 && this.samples > 0 && (time[0] ?? 0) - this.prevEnd > limit;
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
    this.gaps.push(gap);
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
