"use client";

import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ReferenceDot,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";

export interface SpectrumChartProps {
  axis: string;
  points: { freqHz: number; current?: number; baseline?: number }[];
  peaks: { freqHz: number; levelDb: number; kind: string }[];
  /** Legend name of the log's line (default "latest log"). */
  currentLabel?: string;
}

/** Latest log against the baseline for one axis: PSD in dB re 1 (deg/s)²/Hz over frequency. */
export function SpectrumChart({
  axis,
  points,
  peaks,
  currentLabel = "latest log",
}: SpectrumChartProps) {
  if (points.length === 0) return <p className="muted">No analysed log yet.</p>;
  return (
    <div className="chart-box" data-testid={`spectrum-${axis}`}>
      <ResponsiveContainer>
        <LineChart data={points} margin={{ top: 8, right: 16, bottom: 18, left: 4 }}>
          <CartesianGrid stroke="#e4dfd4" />
          <XAxis
            dataKey="freqHz"
            type="number"
            scale="log"
            domain={["dataMin", "dataMax"]}
            ticks={[50, 100, 200, 300, 500, 1000, 1500]}
            allowDataOverflow
            label={{ value: "Hz", position: "insideBottomRight", offset: -8 }}
          />
          <YAxis
            width={48}
            domain={["auto", "auto"]}
            label={{ value: "dB", angle: -90, position: "insideLeft" }}
          />
          <Tooltip
            formatter={(v) => (typeof v === "number" ? `${v.toFixed(1)} dB` : String(v))}
            labelFormatter={(f) => `${Number(f).toFixed(1)} Hz`}
          />
          <Legend verticalAlign="top" height={24} />
          <Line
            name="baseline"
            dataKey="baseline"
            stroke="#8a9aa1"
            strokeWidth={2}
            strokeDasharray="5 3"
            dot={false}
            isAnimationActive={false}
          />
          <Line
            name={currentLabel}
            dataKey="current"
            stroke="#c2410c"
            strokeWidth={2}
            dot={false}
            isAnimationActive={false}
          />
          {peaks.map((p) => (
            <ReferenceDot
              key={p.freqHz}
              x={p.freqHz}
              y={p.levelDb}
              r={4}
              fill={p.kind === "structural" ? "#14313d" : "#f4b63f"}
              stroke="#fff"
            />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}
