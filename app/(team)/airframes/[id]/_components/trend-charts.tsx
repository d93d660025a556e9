"use client";

import { useRouter } from "next/navigation";
import { lineStyle } from "@/app/_components/line-styles";
import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";

type Row = { logId: string; fileName: string; t: number } & Record<string, number | string | null>;
type Steps = { watch: number; inspect: number; ground: number };

export interface TrendChartsProps {
  rows: Row[];
  modes: string[];
  events: { t: number; label: string }[];
  thresholds: { modeShiftPct: Steps; levelDb: Steps };
}

const DATE = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", timeZone: "UTC" });
const STEP_LINES = (t: Steps, sign: 1 | -1) =>
  (["watch", "inspect", "ground"] as const).map((k) => ({
    y: sign * t[k],
    label: k,
    colour: k === "watch" ? "var(--watch)" : k === "inspect" ? "var(--inspect)" : "var(--ground)",
  }));

function TrendChart({
  rows,
  series,
  steps,
  unit,
  events,
  testId,
}: {
  rows: Row[];
  series: { key: string; name: string }[];
  steps: { y: number; label: string; colour: string }[];
  unit: string;
  events: TrendChartsProps["events"];
  testId: string;
}) {
  const router = useRouter();
  return (
    <div className="chart-box trend" data-testid={testId}>
      <ResponsiveContainer>
        <LineChart
          data={rows}
          margin={{ top: 10, right: 20, bottom: 8, left: 4 }}
          onClick={(state) => {
            const index =
              typeof state?.activeTooltipIndex === "number"
                ? state.activeTooltipIndex
                : Number(state?.activeTooltipIndex);
            const row = Number.isInteger(index) ? rows[index] : undefined;
            if (row) router.push(`/logs/${row.logId}`);
          }}
        >
          <CartesianGrid stroke="#e4dfd4" />
          <XAxis
            dataKey="t"
            type="number"
            scale="time"
            domain={["dataMin", "dataMax"]}
            tickFormatter={(t: number) => DATE.format(t)}
          />
          <YAxis width={48} unit={unit} domain={["auto", "auto"]} />
          <Tooltip
            labelFormatter={(_, payload) => pointFileName(payload?.[0]?.payload)}
            formatter={(v) =>
              v === null || v === undefined ? "no peak near it" : `${String(v)} ${unit}`
            }
          />
          <Legend />
          {steps.map((s) => (
            <ReferenceLine
              key={`${s.label}${s.y}`}
              y={s.y}
              stroke={s.colour}
              strokeDasharray="3 3"
              label={{ value: s.label, position: "right", fontSize: 10 }}
            />
          ))}
          {events.map((e, i) => (
            <ReferenceLine
              key={i}
              x={e.t}
              stroke="#9fb3bb"
              label={{ value: e.label, angle: -90, position: "insideTopLeft", fontSize: 9 }}
            />
          ))}
          {series.map((s, i) => {
            const style = lineStyle(i);
            return (
              <Line
                key={s.key}
                dataKey={s.key}
                name={s.name}
                stroke={style.stroke}
                strokeDasharray={style.dash}
                isAnimationActive={false}
                connectNulls={false}
              />
            );
          })}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Mode shifts and band rises against the baseline over the airframe's logs; click a point to open its log. */
export function TrendCharts({ rows, modes, events, thresholds }: TrendChartsProps) {
  if (rows.length === 0) return <p className="muted">No analysed log yet.</p>;
  const inRange = events.filter(
    (e) => e.t >= (rows[0]?.t ?? 0) && e.t <= (rows[rows.length - 1]?.t ?? 0),
  );
  return (
    <div className="grid two">
      <div className="card">
        <h3>Mode frequency, % from the baseline</h3>
        <TrendChart
          rows={rows}
          series={modes.map((m) => ({ key: `mode:${m}`, name: m }))}
          steps={STEP_LINES(thresholds.modeShiftPct, -1)}
          unit="%"
          events={inRange}
          testId="trend-modes"
        />
      </div>
      <div className="card">
        <h3>Largest band rise at matched throttle, dB</h3>
        <TrendChart
          rows={rows}
          series={["roll", "pitch", "yaw"].map((a) => ({ key: `band:${a}`, name: a }))}
          steps={STEP_LINES(thresholds.levelDb, 1)}
          unit="dB"
          events={inRange}
          testId="trend-bands"
        />
      </div>
    </div>
  );
}

/** The log's file name of a hovered point (recharts types the payload as any). */
function pointFileName(point: unknown): string {
  if (typeof point === "object" && point !== null && "fileName" in point) {
    const { fileName } = point;
    return typeof fileName === "string" ? fileName : "";
  }
  return "";
}
