"use client";

import { channelFor } from "@/lib/logs/columns";
import {
  convertedValue,
  draftOf,
  draftToMap,
  mapKeys,
  type MapDraft,
} from "@/lib/logs/map-preview";

export interface ColumnMapTableProps {
  fileName: string;
  headers: string[];
  /** The first data rows of the file, as numbers (null: not a number). */
  rows: (number | null)[][];
  mapText: string;
  onChange: (mapText: string) => void;
}

const UNIT_WORDS: Record<string, string> = {
  us: "µs",
  ms: "ms",
  s: "s",
  "deg/s": "deg/s",
  "rad/s": "rad/s",
  auto: "tell from values",
  fraction: "0..1",
  percent: "0..100 %",
  "pulse-us": "1000..2000 µs",
  rpm: "rpm",
  hz: "Hz (rev/s)",
};
const SHOWN_UNIT: Record<string, string> = {
  time: "s from the first row",
  gyro: "deg/s",
  setpoint: "deg/s",
  throttle: "0..1",
  rpm: "rpm",
};

function preview(key: string, unit: string, column: number, rows: (number | null)[][]): string {
  if (column < 0) return "";
  const channel = channelFor(key, unit);
  const t0 = rows[0]?.[column] ?? 0;
  const values = rows.slice(0, 3).map((r) => {
    const v = r[column];
    return v === null || v === undefined
      ? "?"
      : Number(convertedValue(channel, v, t0).toPrecision(4)).toString();
  });
  return `${values.join(", ")} ${SHOWN_UNIT[channel.kind] ?? ""}`;
}

/**
 * The column map as a table: one row per field heatcheck reads, the file's own headers and the
 * unit to choose from, the first rows converted as heatcheck will read them, and what is still
 * missing. It edits the same map text the command line and import profiles use.
 */
export function ColumnMapTable({
  fileName,
  headers,
  rows,
  mapText,
  onChange,
}: ColumnMapTableProps) {
  const draft = draftOf(mapText);
  const motors = Object.keys(draft).filter((k) => k.startsWith("rpm")).length;
  const keys = mapKeys(Math.max(motors, headers.filter((h) => /rpm|hz|esc|mot/i.test(h)).length));
  const { problem } = draftToMap(draft);
  const set = (key: string, patch: Partial<{ header: string; unit: string }>) => {
    const units = keys.find((k) => k.key === key)?.units ?? [];
    const next: MapDraft = {
      ...draft,
      [key]: {
        header: draft[key]?.header ?? "",
        unit: draft[key]?.unit ?? units[0] ?? "",
        ...patch,
      },
    };
    onChange(draftToMap(next).mapText);
  };
  return (
    <div className="map-table">
      <table data-testid="map-table">
        <caption className="muted small">Columns of {fileName}</caption>
        <thead>
          <tr>
            <th scope="col">field</th>
            <th scope="col">column in the file</th>
            <th scope="col">unit in the file</th>
            <th scope="col">first rows, as read</th>
          </tr>
        </thead>
        <tbody>
          {keys.map((k) => {
            const entry = draft[k.key];
            const column = entry ? headers.indexOf(entry.header) : -1;
            return (
              <tr key={k.key}>
                <th scope="row">
                  {k.label}
                  {k.required ? <span className="muted small"> (needed)</span> : null}
                </th>
                <td>
                  <select
                    aria-label={`column for ${k.label}`}
                    value={entry?.header ?? ""}
                    onChange={(e) => set(k.key, { header: e.target.value })}
                  >
                    <option value="">— not in this file —</option>
                    {headers.map((h) => (
                      <option key={h} value={h}>
                        {h}
                      </option>
                    ))}
                  </select>
                </td>
                <td>
                  <select
                    aria-label={`unit of ${k.label}`}
                    value={entry?.unit ?? k.units[0]}
                    disabled={!entry?.header}
                    onChange={(e) => set(k.key, { unit: e.target.value })}
                  >
                    {k.units.map((u) => (
                      <option key={u} value={u}>
                        {UNIT_WORDS[u] ?? u}
                      </option>
                    ))}
                  </select>
                </td>
                <td className="small">
                  {entry?.header ? preview(k.key, entry.unit, column, rows) : ""}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p
        className={problem ? "field-error" : "form-message ok"}
        data-testid="map-check"
        role="status"
      >
        {problem ? `Still to do: ${problem}.` : "Every needed field has a column."}
      </p>
    </div>
  );
}
