import {
  AXES,
  channelFor,
  channelKey,
  checkMap,
  formatColumnMap,
  MAX_MOTORS,
  type Channel,
  type ColumnMap,
} from "./columns";

/**
 * What the import screen's column-map table needs: the keys heatcheck reads with the units each
 * may come in, the first rows of a file's head as numbers, and one value converted the way the
 * reader converts it (time in s from the first row, rates in deg/s, throttle 0..1, rpm).
 */

export interface MapKey {
  key: string;
  label: string;
  required: boolean;
  units: readonly string[];
}

/** The keys in the order the table shows them; `motors` rpm rows (at least four). */
export function mapKeys(motors = 4): MapKey[] {
  const n = Math.min(MAX_MOTORS, Math.max(4, motors));
  return [
    { key: "time", label: "time", required: true, units: ["us", "ms", "s"] },
    ...AXES.map((a) => ({ key: a, label: `gyro ${a}`, required: true, units: ["deg/s", "rad/s"] })),
    {
      key: "throttle",
      label: "throttle",
      required: false,
      units: ["auto", "fraction", "percent", "pulse-us"],
    },
    ...Array.from({ length: n }, (_, i) => ({
      key: `rpm${i + 1}`,
      label: `motor ${i + 1} speed`,
      required: false,
      units: ["rpm", "hz"],
    })),
    ...AXES.map((a) => ({
      key: `setpoint_${a}`,
      label: `setpoint ${a}`,
      required: false,
      units: ["deg/s", "rad/s"],
    })),
  ];
}

/** The numeric cells of up to `max` data rows after the header line (1-based), null where not a number. */
export function previewRows(text: string, headerLine: number, max = 5): (number | null)[][] {
  const lines = text.split(/\r\n|\r|\n/);
  const rows: (number | null)[][] = [];
  // The last line of a head slice may be cut short: it is left out.
  for (let i = headerLine; i < lines.length - 1 && rows.length < max; i++) {
    const line = lines[i] ?? "";
    if (line.trim() === "" || line.startsWith("#")) continue;
    rows.push(
      line
        .split(",")
        .map((c) => (c.trim() === "" || !Number.isFinite(Number(c)) ? null : Number(c))),
    );
  }
  return rows;
}

/** One raw value in the reader's units: time in s after `t0`, gyro and setpoint deg/s, throttle 0..1, rpm. */
export function convertedValue(channel: Channel, raw: number, t0 = 0): number {
  switch (channel.kind) {
    case "time":
      return (raw - t0) * (channel.unit === "us" ? 1e-6 : channel.unit === "ms" ? 1e-3 : 1);
    case "gyro":
    case "setpoint":
      return channel.unit === "rad/s" ? (raw * 180) / Math.PI : raw;
    case "throttle":
      if (channel.unit === "percent") return raw / 100;
      if (channel.unit === "pulse-us") return (raw - 1000) / 1000;
      if (channel.unit === "auto")
        return raw > 100.01 ? (raw - 1000) / 1000 : raw > 1.0001 ? raw / 100 : raw;
      return raw;
    case "rpm":
      return channel.unit === "hz" ? raw * 60 : raw;
  }
}

/** A map being edited: key → header and unit. Empty header: not mapped. */
export type MapDraft = Record<string, { header: string; unit: string }>;

/** The draft of a map string, reading each entry on its own so one bad entry loses nothing else. */
export function draftOf(mapText: string): MapDraft {
  const draft: MapDraft = {};
  for (const part of mapText.split(",")) {
    const eq = part.indexOf("=");
    if (eq <= 0) continue;
    const rest = part.slice(eq + 1);
    const bar = rest.lastIndexOf("|");
    try {
      const channel = channelFor(part.slice(0, eq), bar >= 0 ? rest.slice(bar + 1) : undefined);
      draft[channelKey(channel)] = {
        header: (bar >= 0 ? rest.slice(0, bar) : rest).trim(),
        unit: channel.unit,
      };
    } catch {
      // an entry the table cannot show is dropped from it; the user sees the key unmapped
    }
  }
  return draft;
}

/** The draft as a map string (the syntax the CLI and import profiles use) and what is still wrong with it. */
export function draftToMap(draft: MapDraft): { mapText: string; problem: string | null } {
  const map: ColumnMap = [];
  for (const [key, v] of Object.entries(draft))
    if (v.header !== "") map.push({ header: v.header, channel: channelFor(key, v.unit) });
  const mapText = formatColumnMap(map);
  try {
    checkMap(map);
    return { mapText, problem: null };
  } catch (e) {
    return { mapText, problem: e instanceof Error ? e.message : String(e) };
  }
}
