import type { HeaderStyle } from "./airframe";
import type { LoggedLog } from "./simulate";

/**
 * A simulated log written as a file: heatcheck's canonical header, or one of two invented foreign
 * layouts (rad/s gyro, time in ms or s, throttle in percent or pulse-µs, rpm in Hz or rev/min)
 * together with the column-map string the README documents for reading it. The foreign header
 * names are made up for heatcheck's tests.
 */

interface Layout {
  time: { header: string; unit: "us" | "ms" | "s" };
  gyro: [string, string, string];
  gyroUnit: "deg/s" | "rad/s";
  throttle: { header: string; unit: "fraction" | "percent" | "pulse-us" };
  rpm: (motor: number) => string;
  rpmUnit: "rpm" | "hz";
}

// The layouts, one table per quantity (each row: canonical, foreign-a, foreign-b).
const TIME: Record<HeaderStyle, Layout["time"]> = {
  canonical: { header: "time_us", unit: "us" },
  "foreign-a": { header: "clock_ms", unit: "ms" },
  "foreign-b": { header: "elapsed s", unit: "s" },
};
const GYRO: Record<HeaderStyle, Pick<Layout, "gyro" | "gyroUnit">> = {
  canonical: { gyro: ["gyro_roll", "gyro_pitch", "gyro_yaw"], gyroUnit: "deg/s" },
  "foreign-a": { gyro: ["rot_a", "rot_b", "rot_c"], gyroUnit: "rad/s" },
  "foreign-b": { gyro: ["turn rate 1", "turn rate 2", "turn rate 3"], gyroUnit: "rad/s" },
};
const THROTTLE: Record<HeaderStyle, Layout["throttle"]> = {
  canonical: { header: "throttle", unit: "fraction" },
  "foreign-a": { header: "lever_pct", unit: "percent" },
  "foreign-b": { header: "pulse", unit: "pulse-us" },
};
const RPM: Record<HeaderStyle, Pick<Layout, "rpm" | "rpmUnit">> = {
  canonical: { rpm: (m) => `rpm_${m}`, rpmUnit: "rpm" },
  "foreign-a": { rpm: (m) => `spin${m}_hz`, rpmUnit: "hz" },
  "foreign-b": { rpm: (m) => `esc ${m} speed`, rpmUnit: "rpm" },
};

function layoutOf(style: HeaderStyle): Layout {
  return { time: TIME[style], ...GYRO[style], throttle: THROTTLE[style], ...RPM[style] };
}

export interface CsvMeta {
  airframe: string;
  flownAt: string;
  note: string;
}

export interface WrittenLog {
  bytes: Uint8Array;
  /** The column map to read it with (undefined for the canonical header). */
  map: string | undefined;
  style: HeaderStyle;
}

/** The map string for a layout, in the README's syntax. */
export function columnMapFor(style: HeaderStyle, motors: readonly number[]): string | undefined {
  if (style === "canonical") return undefined;
  const l = layoutOf(style);
  const keys = ["roll", "pitch", "yaw"];
  return [
    `time=${l.time.header}|${l.time.unit}`,
    ...l.gyro.map((h, i) => `${keys[i] ?? ""}=${h}|${l.gyroUnit}`),
    `throttle=${l.throttle.header}|${l.throttle.unit}`,
    ...motors.map((m) => `rpm${m}=${l.rpm(m)}|${l.rpmUnit}`),
  ].join(",");
}

const DEG_TO_RAD = Math.PI / 180;
const SCALE = [1, 10, 100, 1000, 10000, 100000, 1000000];

/**
 * v with `digits` decimals, as toFixed writes it for the values a log holds (|v| < 1e9), through
 * integer formatting, which is several times faster than toFixed in the writer's hot loop.
 */
export function fixed(v: number, digits: number): string {
  const k = Math.round(Math.abs(v) * (SCALE[digits] ?? 10 ** digits));
  if (digits === 0) return (v < 0 && k !== 0 ? "-" : "") + String(k);
  const s = String(k).padStart(digits + 1, "0");
  return (
    (v < 0 && k !== 0 ? "-" : "") + s.slice(0, s.length - digits) + "." + s.slice(s.length - digits)
  );
}

export function writeLogCsv(log: LoggedLog, style: HeaderStyle, meta: CsvMeta): WrittenLog {
  const l = layoutOf(style);
  const head = [
    `# airframe: ${meta.airframe}`,
    `# flown_at: ${meta.flownAt}`,
    `# note: ${meta.note}`,
  ];
  head.push([l.time.header, ...l.gyro, l.throttle.header, ...log.motors.map(l.rpm)].join(","));
  const chunks: Buffer[] = [Buffer.from(head.join("\n") + "\n")];
  const time = (t: number) =>
    l.time.unit === "us"
      ? String(Math.round(t * 1e6))
      : l.time.unit === "ms"
        ? fixed(t * 1e3, 3)
        : fixed(t, 6);
  const rate = (v: number) => (l.gyroUnit === "deg/s" ? fixed(v, 3) : fixed(v * DEG_TO_RAD, 6));
  const thr = (v: number) =>
    l.throttle.unit === "fraction"
      ? fixed(v, 4)
      : l.throttle.unit === "percent"
        ? fixed(v * 100, 2)
        : fixed(1000 + 1000 * v, 1);
  const rpm = (v: number) => (l.rpmUnit === "rpm" ? String(Math.round(v)) : fixed(v / 60, 2));
  const n = log.timeS.length;
  const BLOCK = 4096;
  for (let start = 0; start < n; start += BLOCK) {
    const rows: string[] = [];
    for (let i = start; i < Math.min(n, start + BLOCK); i++) {
      let row = `${time(log.timeS[i] ?? 0)},${rate(log.gyro[0][i] ?? 0)},${rate(log.gyro[1][i] ?? 0)},${rate(log.gyro[2][i] ?? 0)},${thr(log.throttle[i] ?? 0)}`;
      for (const r of log.rpm) row += `,${rpm(r[i] ?? 0)}`;
      rows.push(row);
    }
    chunks.push(Buffer.from(rows.join("\n") + "\n"));
  }
  return { bytes: Buffer.concat(chunks), map: columnMapFor(style, log.motors), style };
}
