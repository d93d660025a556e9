import { LogFormatError } from "../errors";
import {
  AXES,
  canonicalMap,
  channelKey,
  checkMap,
  proposeColumnMap,
  type ColumnBinding,
  type ColumnMap,
  type PerAxis,
  type RateUnit,
  type RpmUnit,
  type ThrottleUnit,
  type TimeUnit,
} from "./columns";
import { separatorHint } from "./preamble";

/**
 * Where each channel sits in a row of a file and how its values turn into heatcheck's units
 * (seconds, deg/s, rev/min, throttle 0..1). Built once when the header row arrives.
 */

const DEG_PER_RAD = 180 / Math.PI;

/** One channel's place in a raw row and the factor that turns its values into heatcheck's unit. */
export interface Slot {
  /** Index in the raw row (only the columns read have a slot). */
  slot: number;
  /** 0-based column of the file. */
  column: number;
  scale: number;
}

export interface RpmSlot extends Slot {
  /** 1-based motor number. */
  motor: number;
}

export interface ThrottleSlot {
  slot: number;
  column: number;
  /** As the map says; "auto" is decided from the first rows' values (throttleUnitOf). */
  unit: ThrottleUnit;
}

/** Column slots in a raw row. */
export interface Layout {
  headers: string[];
  /** The bindings read (a partial set of setpoint columns is dropped). */
  map: ColumnMap;
  /** For every file column, the slot it fills, or -1 when unused. */
  slotOfColumn: Int32Array;
  slots: number;
  time: Slot;
  gyro: PerAxis<Slot>;
  throttle: ThrottleSlot | null;
  /** In motor order. */
  rpm: readonly RpmSlot[];
  setpoint: PerAxis<Slot> | null;
}

/** The map a reader uses for these headers, and the sentences for what it guessed. */
export interface ChosenMap {
  map: ColumnMap;
  guesses: string[];
}

/**
 * The map for a header row: the explicit one, else the canonical one, else (when guessing is
 * allowed) the proposal from header words. Throws LogFormatError at the header's line when no map
 * covers time and the three gyro axes; the sentence hints at a separator other than commas.
 */
export function chooseMap(
  headers: readonly string[],
  headerLine: string,
  options: { map?: ColumnMap; allowGuess?: boolean },
  line: number,
): ChosenMap {
  if (options.map) return { map: options.map, guesses: [] };
  const canonical = canonicalMap(headers);
  if (canonical) return { map: canonical, guesses: [] };
  const proposal = proposeColumnMap(headers);
  if (proposal.missing.length > 0 || options.allowGuess === false) {
    const need =
      proposal.missing.length > 0 ? proposal.missing.join(", ") : "time, roll, pitch, yaw";
    throw new LogFormatError(
      `no column for ${need}: name the columns time_us, gyro_roll, gyro_pitch, gyro_yaw, or give a column map${separatorHint(headerLine)}`,
      { line },
    );
  }
  return { map: proposal.map, guesses: proposal.guesses };
}

/** Factor from a time unit to seconds. */
export function secondsPer(unit: TimeUnit): number {
  return unit === "us" ? 1e-6 : unit === "ms" ? 1e-3 : 1;
}

/** Factor from a rate unit to deg/s. */
export function degPerSecondPer(unit: RateUnit): number {
  return unit === "rad/s" ? DEG_PER_RAD : 1;
}

/** Factor from an rpm column's unit to mechanical rev/min. */
export function rpmPer(unit: RpmUnit): number {
  return unit === "hz" ? 60 : 1;
}

/** Throttle as a 0..1 fraction from a value in the given unit ("auto" must be decided first). */
export function throttleConversion(unit: ThrottleUnit): (v: number) => number {
  switch (unit) {
    case "percent":
      return (v) => v / 100;
    case "pulse-us":
      return (v) => (v - 1000) / 1000;
    default:
      return (v) => v;
  }
}

/** The throttle unit told from the largest of the first values: ≤ 1 a fraction, ≤ 100 percent, else µs pulses. */
export function throttleUnitOf(max: number): Exclude<ThrottleUnit, "auto"> {
  return max <= 1.0001 ? "fraction" : max <= 100.01 ? "percent" : "pulse-us";
}

/**
 * The layout of a checked map over a header row. Throws LogFormatError (at the header's line) when
 * the map names a column the header does not have.
 */
export function makeLayout(headers: string[], map: ColumnMap, line: number): Layout {
  checkMap(map);
  // A partial set of setpoint columns is of no use: those columns are ignored.
  const setpoints = map.filter((b) => b.channel.kind === "setpoint").length;
  const used = setpoints === 3 ? map : map.filter((b) => b.channel.kind !== "setpoint");
  const slotOfColumn = new Int32Array(headers.length).fill(-1);
  let slots = 0;
  let time: Slot | undefined;
  const gyro: (Slot | undefined)[] = [undefined, undefined, undefined];
  const setpoint: (Slot | undefined)[] = [undefined, undefined, undefined];
  let throttle: ThrottleSlot | null = null;
  const rpm: RpmSlot[] = [];
  // Motors last and in motor order, so that the rpm slots follow the motor numbers.
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
        time = { slot, column, scale: secondsPer(c.unit) };
        break;
      case "gyro":
        gyro[AXES.indexOf(c.axis)] = { slot, column, scale: degPerSecondPer(c.unit) };
        break;
      case "setpoint":
        setpoint[AXES.indexOf(c.axis)] = { slot, column, scale: degPerSecondPer(c.unit) };
        break;
      case "throttle":
        throttle = { slot, column, unit: c.unit };
        break;
      case "rpm":
        rpm.push({ slot, column, scale: rpmPer(c.unit), motor: c.motor });
        break;
    }
  }
  const [roll, pitch, yaw] = gyro;
  // checkMap has made sure of these; the test keeps the types honest.
  if (!time || !roll || !pitch || !yaw)
    throw new LogFormatError("the map needs a column for time, roll, pitch and yaw", { line });
  const [sr, sp, sy] = setpoint;
  return {
    headers,
    map: used,
    slotOfColumn,
    slots,
    time,
    gyro: [roll, pitch, yaw],
    throttle,
    rpm,
    setpoint: sr && sp && sy ? [sr, sp, sy] : null,
  };
}

/** The map as read: an "auto" throttle unit replaced by the one decided from the values. */
export function boundMap(layout: Layout, throttleUnit: ThrottleUnit): ColumnMap {
  return layout.map.map((b) =>
    b.channel.kind === "throttle"
      ? { header: b.header, channel: { kind: "throttle", unit: throttleUnit } }
      : b,
  );
}

function motorOrder(b: ColumnBinding): number {
  return b.channel.kind === "rpm" ? 100 + b.channel.motor : 0;
}
