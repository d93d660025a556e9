import { InputError } from "../errors";

/**
 * Channels heatcheck reads from a log, and how a file's columns map onto them.
 *
 * Canonical headers (no map needed): `time_us` or `time_s`; `gyro_roll`, `gyro_pitch`,
 * `gyro_yaw` in deg/s; optional `throttle` (0..1); optional `rpm_1` … `rpm_8` in mechanical
 * rev/min; optional `setpoint_roll`, `setpoint_pitch`, `setpoint_yaw` in deg/s.
 */

export const AXES = ["roll", "pitch", "yaw"] as const;
export type Axis = (typeof AXES)[number];
/** An index into {@link AXES}. */
export type AxisIndex = 0 | 1 | 2;
/** One value per gyro axis, in {@link AXES} order. */
export type PerAxis<T> = readonly [T, T, T];

/** `make` for every axis, in {@link AXES} order: a tuple, so no index needs a check. */
export function perAxis<T>(make: (axis: Axis, a: AxisIndex) => T): [T, T, T] {
  return [make("roll", 0), make("pitch", 1), make("yaw", 2)];
}

/** `make` for every axis, as a record keyed (and ordered) like {@link AXES}. */
export function axisRecord<T>(make: (axis: Axis, a: AxisIndex) => T): Record<Axis, T> {
  return { roll: make("roll", 0), pitch: make("pitch", 1), yaw: make("yaw", 2) };
}
export const MAX_MOTORS = 8;

export type TimeUnit = "us" | "ms" | "s";
export type RateUnit = "deg/s" | "rad/s";
/** fraction: 0..1 · percent: 0..100 · pulse-us: 1000..2000 µs pulse width · auto: told by the values. */
export type ThrottleUnit = "fraction" | "percent" | "pulse-us" | "auto";
export type RpmUnit = "rpm" | "hz";

export type Channel =
  | { kind: "time"; unit: TimeUnit }
  | { kind: "gyro"; axis: Axis; unit: RateUnit }
  | { kind: "setpoint"; axis: Axis; unit: RateUnit }
  | { kind: "throttle"; unit: ThrottleUnit }
  | { kind: "rpm"; motor: number; unit: RpmUnit };

/** One file column read as one channel. */
export interface ColumnBinding {
  header: string;
  channel: Channel;
}

/** A column map: which header feeds which channel, in which unit. */
export type ColumnMap = ColumnBinding[];

/** The key a channel has in a map string and in saved import profiles: time, roll, rpm3, setpoint_yaw … */
export function channelKey(c: Channel): string {
  switch (c.kind) {
    case "time":
      return "time";
    case "gyro":
      return c.axis;
    case "setpoint":
      return `setpoint_${c.axis}`;
    case "throttle":
      return "throttle";
    case "rpm":
      return `rpm${c.motor}`;
  }
}

const TIME_UNITS: readonly TimeUnit[] = ["us", "ms", "s"];
const RATE_UNITS: readonly RateUnit[] = ["deg/s", "rad/s"];
const THROTTLE_UNITS: readonly ThrottleUnit[] = ["fraction", "percent", "pulse-us", "auto"];
const RPM_UNITS: readonly RpmUnit[] = ["rpm", "hz"];

function pick<T extends string>(
  allowed: readonly T[],
  unit: string | undefined,
  fallback: T,
  key: string,
): T {
  if (unit === undefined || unit === "") return fallback;
  const u = unit.trim().toLowerCase().replace("µ", "u");
  const found = allowed.find((a) => a === u);
  if (!found) {
    throw new InputError(
      `unit "${unit}" is not known for ${key}; use one of ${allowed.join(", ")}`,
      "map",
    );
  }
  return found;
}

/** Builds the channel for a map key and an optional unit; throws InputError naming the key. */
export function channelFor(key: string, unit?: string): Channel {
  const k = key.trim().toLowerCase();
  if (k === "time") return { kind: "time", unit: pick(TIME_UNITS, unit, "us", k) };
  if (k === "throttle") return { kind: "throttle", unit: pick(THROTTLE_UNITS, unit, "auto", k) };
  for (const axis of AXES) {
    if (k === axis || k === `gyro_${axis}`)
      return { kind: "gyro", axis, unit: pick(RATE_UNITS, unit, "deg/s", k) };
    if (k === `setpoint_${axis}`)
      return { kind: "setpoint", axis, unit: pick(RATE_UNITS, unit, "deg/s", k) };
  }
  const rpm = /^rpm_?(\d)$/.exec(k);
  if (rpm) {
    const motor = Number(rpm[1]);
    if (motor < 1 || motor > MAX_MOTORS)
      throw new InputError(`motors are numbered 1 to ${MAX_MOTORS}, got ${key}`, "map");
    return { kind: "rpm", motor, unit: pick(RPM_UNITS, unit, "rpm", k) };
  }
  throw new InputError(
    `"${key}" is not a channel; use time, roll, pitch, yaw, throttle, rpm1…rpm8 or setpoint_roll|pitch|yaw`,
    "map",
  );
}

/**
 * Parses a map string: comma-separated `key=Header name` or `key=Header name|unit`, for example
 * `time=Time (us)|us,roll=GyroX|rad/s,pitch=GyroY|rad/s,yaw=GyroZ|rad/s,throttle=Thr|pulse-us`.
 */
export function parseColumnMap(text: string): ColumnMap {
  const map: ColumnMap = [];
  for (const part of text.split(",")) {
    if (part.trim() === "") continue;
    const eq = part.indexOf("=");
    if (eq <= 0)
      throw new InputError(
        `map entry "${part.trim()}" must look like key=Header or key=Header|unit`,
        "map",
      );
    const key = part.slice(0, eq);
    const rest = part.slice(eq + 1);
    const bar = rest.lastIndexOf("|");
    const header = (bar >= 0 ? rest.slice(0, bar) : rest).trim();
    const unit = bar >= 0 ? rest.slice(bar + 1) : undefined;
    if (header === "") throw new InputError(`map entry "${part.trim()}" names no header`, "map");
    map.push({ header, channel: channelFor(key, unit) });
  }
  return checkMap(map);
}

/** Writes a map back in the syntax {@link parseColumnMap} reads. */
export function formatColumnMap(map: ColumnMap): string {
  return map.map((b) => `${channelKey(b.channel)}=${b.header}|${b.channel.unit}`).join(",");
}

/** Rejects a map that binds one channel twice, one column to two keys, or lacks time or a gyro axis. */
export function checkMap(map: ColumnMap): ColumnMap {
  const seen = new Set<string>();
  const keyOfHeader = new Map<string, string>();
  for (const b of map) {
    const key = channelKey(b.channel);
    if (seen.has(key)) throw new InputError(`the map binds ${key} twice`, "map");
    seen.add(key);
    const other = keyOfHeader.get(b.header);
    if (other !== undefined) {
      throw new InputError(
        `the map binds the column "${b.header}" twice (to ${other} and to ${key}); give each key its own column`,
        "map",
      );
    }
    keyOfHeader.set(b.header, key);
  }
  const missing = ["time", ...AXES].filter((k) => !seen.has(k));
  if (missing.length > 0) {
    throw new InputError(`the map needs a column for ${missing.join(", ")}`, "map");
  }
  return map;
}

/** The map for a file with canonical headers, or undefined when a required one is missing. */
export function canonicalMap(headers: readonly string[]): ColumnMap | undefined {
  const map: ColumnMap = [];
  const has = (h: string) => headers.includes(h);
  if (has("time_us")) map.push({ header: "time_us", channel: { kind: "time", unit: "us" } });
  else if (has("time_s")) map.push({ header: "time_s", channel: { kind: "time", unit: "s" } });
  else return undefined;
  for (const axis of AXES) {
    if (!has(`gyro_${axis}`)) return undefined;
    map.push({ header: `gyro_${axis}`, channel: { kind: "gyro", axis, unit: "deg/s" } });
  }
  if (has("throttle"))
    map.push({ header: "throttle", channel: { kind: "throttle", unit: "fraction" } });
  for (let m = 1; m <= MAX_MOTORS; m++) {
    if (has(`rpm_${m}`))
      map.push({ header: `rpm_${m}`, channel: { kind: "rpm", motor: m, unit: "rpm" } });
  }
  for (const axis of AXES) {
    if (has(`setpoint_${axis}`)) {
      map.push({ header: `setpoint_${axis}`, channel: { kind: "setpoint", axis, unit: "deg/s" } });
    }
  }
  return map;
}

/** True when column `i` of the rows has at least two values and each is larger than the one before. */
function rises(rows: readonly (readonly (number | null)[])[], i: number): boolean {
  const v = rows.map((r) => r[i]).filter((x): x is number => typeof x === "number");
  return v.length >= 2 && v.every((x, k) => k === 0 || x > (v[k - 1] ?? Infinity));
}

export interface MapProposal {
  map: ColumnMap;
  /** One plain sentence per guess, to show the user before the import. */
  guesses: string[];
  /** Required channels no header suggested. */
  missing: string[];
}

const AXIS_WORDS: Record<Axis, RegExp> = {
  roll: /(roll|\bx\b|\[0\]|_x\b|x$)/,
  pitch: /(pitch|\by\b|\[1\]|_y\b|y$)/,
  yaw: /(yaw|\bz\b|\[2\]|_z\b|z$)/,
};

/**
 * Proposes a map from header words: time/us/ms, gyro (or rate) with roll/x, pitch/y, yaw/z,
 * throttle/thr, rpm or motor/mot/esc with a number and rpm or Hz (0-based numbering is shifted to
 * 1-based); without a time word, a column with a time unit in its name whose first values (`rows`,
 * when given) only rise. It is a proposal: the user confirms it, and every guess is said in words.
 */
export function proposeColumnMap(
  headers: readonly string[],
  rows: readonly (readonly (number | null)[])[] = [],
): MapProposal {
  const canonical = canonicalMap(headers);
  if (canonical) return { map: canonical, guesses: [], missing: [] };
  const map: ColumnMap = [];
  const guesses: string[] = [];
  const taken = new Set<string>();
  const bind = (header: string, channel: Channel, why: string) => {
    const key = channelKey(channel);
    if (taken.has(key)) return;
    taken.add(key);
    map.push({ header, channel });
    guesses.push(`"${header}" read as ${key} in ${channel.unit} (${why})`);
  };
  const lower = headers.map((h) => h.toLowerCase().replace("µ", "u"));

  lower.forEach((h, i) => {
    const header = headers[i] ?? "";
    if (!/time|timestamp|\bt\b/.test(h)) return;
    const unit: TimeUnit = /\bus\b|usec|micro|\(us\)|_us/.test(h)
      ? "us"
      : /ms|milli/.test(h)
        ? "ms"
        : /\(s\)|_s\b|sec/.test(h)
          ? "s"
          : "us";
    bind(
      header,
      { kind: "time", unit },
      unit === "us" && !/us/.test(h) ? "no unit in the name, assumed µs" : "time word",
    );
  });
  // No time word: a column with a time unit as a word of its name whose first values only rise.
  if (!taken.has("time")) {
    lower.forEach((h, i) => {
      const unit: TimeUnit | null = /(^|[\s_([])(us|usec)([\s_)\]]|$)/.test(h)
        ? "us"
        : /(^|[\s_([])ms([\s_)\]]|$)/.test(h)
          ? "ms"
          : /(^|[\s_([])(s|sec)([\s_)\]]|$)/.test(h)
            ? "s"
            : null;
      if (!unit || !rises(rows, i)) return;
      bind(
        headers[i] ?? "",
        { kind: "time", unit },
        `${unit} in the name and its values only rise`,
      );
    });
  }
  const gyroLike = lower.map((h) => /gyro|rate|gyr/.test(h) && !/setpoint|target|rc/.test(h));
  const anyGyro = gyroLike.some(Boolean);
  lower.forEach((h, i) => {
    const header = headers[i] ?? "";
    if (anyGyro ? !gyroLike[i] : !/roll|pitch|yaw/.test(h) || /setpoint|target|rc/.test(h)) return;
    const unit: RateUnit = /rad/.test(h) ? "rad/s" : "deg/s";
    for (const axis of AXES) {
      if (AXIS_WORDS[axis].test(h)) {
        bind(
          header,
          { kind: "gyro", axis, unit },
          unit === "rad/s" ? "rad in the name" : "rate assumed in deg/s",
        );
        break;
      }
    }
  });
  lower.forEach((h, i) => {
    const header = headers[i] ?? "";
    if (/throttle|\bthr\b|thrust/.test(h))
      bind(header, { kind: "throttle", unit: "auto" }, "scale told by the values");
  });
  const rpmHeaders = lower
    .map((h, i) => ({ h, i, n: /(?:rpm|motor|mot|esc)\D*(\d)/.exec(h) }))
    .filter((x) => x.n && /rpm|hz|freq/.test(x.h) && !/erpm/.test(x.h));
  const zeroBased = rpmHeaders.some((x) => x.n?.[1] === "0");
  for (const r of rpmHeaders) {
    const motor = Number(r.n?.[1]) + (zeroBased ? 1 : 0);
    if (motor < 1 || motor > MAX_MOTORS) continue;
    const unit: RpmUnit = /hz|freq/.test(r.h) ? "hz" : "rpm";
    bind(
      headers[r.i] ?? "",
      { kind: "rpm", motor, unit },
      zeroBased ? "numbered from 0, shifted to 1" : "motor number in the name",
    );
  }
  const missing = ["time", ...AXES].filter((k) => !taken.has(k));
  return { map, guesses, missing };
}
