"use client";

import { lineStyle } from "@/app/_components/line-styles";
import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";

export interface MotorOrdersChartProps {
  motors: { motor: number; name: string; track: { tS: number; order1Db: number }[] }[];
}

/** Each motor's 1× order level through the flight, dB re 1 (deg/s)²: the odd motor stands out. */
export function MotorOrdersChart({ motors }: MotorOrdersChartProps) {
  if (motors.length === 0)
    return (
      <p className="muted">This log has no motor speed columns, so there are no motor orders.</p>
    );
  const times = [...new Set(motors.flatMap((m) => m.track.map((p) => p.tS)))].sort((a, b) => a - b);
  const data = times.map((tS) => {
    const row: Record<string, number> = { tS };
    for (const m of motors) {
      const p = m.track.find((x) => x.tS === tS);
      if (p) row[`m${m.motor}`] = p.order1Db;
    }
    return row;
  });
  return (
    <div className="chart-box" data-testid="motor-orders">
      <ResponsiveContainer>
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 18, left: 4 }}>
          <CartesianGrid stroke="#e4dfd4" />
          <XAxis
            dataKey="tS"
            type="number"
            domain={["dataMin", "dataMax"]}
            label={{ value: "s", position: "insideBottomRight", offset: -8 }}
          />
          <YAxis
            width={48}
            domain={["auto", "auto"]}
            label={{ value: "dB", angle: -90, position: "insideLeft" }}
          />
          <Tooltip
            formatter={(v) => `${Number(v).toFixed(1)} dB`}
            labelFormatter={(t) => `${Number(t).toFixed(2)} s`}
          />
          <Legend />
          {motors.map((m, i) => {
            const style = lineStyle(i);
            return (
              <Line
                key={m.motor}
                dataKey={`m${m.motor}`}
                name={m.name}
                stroke={style.stroke}
                strokeDasharray={style.dash}
                dot={false}
                isAnimationActive={false}
                connectNulls
              />
            );
          })}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}
