import type { ColumnMap, PerAxis } from "./columns";

/**
 * What the log reader hands on and returns (re-exported by read-log.ts, the reader's public
 * module): the file's description once its rate is known, blocks of rows, gaps and the summary.
 */

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
  gyro: PerAxis<Float64Array>;
  /** 0..1, or null when the log has no throttle column. */
  throttle: Float64Array | null;
  /** rev/min, one array per entry of LogInfo.motors. */
  rpm: readonly Float64Array[];
  /** deg/s in AXES order, or null. */
  setpoint: PerAxis<Float64Array> | null;
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

/** What the head of a log holds, as found by a reader in head mode (see sniff.ts). */
export interface HeadFound {
  metadata: Record<string, string>;
  headers: string[];
  /** 1-based line of the header row. */
  line: number;
}

/** The channels a block carries: a throttle array or none, how many rpm arrays, setpoints or none. */
export interface BlockShape {
  throttle: boolean;
  motors: number;
  setpoint: boolean;
}

/** The shape of the blocks a log described by `info` is read into. */
export function blockShapeOf(
  info: Pick<LogInfo, "hasThrottle" | "motors" | "hasSetpoint">,
): BlockShape {
  return { throttle: info.hasThrottle, motors: info.motors.length, setpoint: info.hasSetpoint };
}

/**
 * An empty block with room for `rows` rows of the channels in `shape`; the caller owns it (a copy
 * of another block's shape: `{ throttle: b.throttle !== null, motors: b.rpm.length, setpoint: b.setpoint !== null }`).
 */
export function newSampleBlock(rows: number, shape: BlockShape): SampleBlock {
  const make = () => new Float64Array(rows);
  return {
    length: 0,
    timeS: make(),
    gyro: [make(), make(), make()],
    throttle: shape.throttle ? make() : null,
    rpm: Array.from({ length: shape.motors }, make),
    setpoint: shape.setpoint ? [make(), make(), make()] : null,
  };
}
