"use client";

import { Line, LineChart, YAxis } from "recharts";

export interface SparklineProps {
  scores: number[];
}

/** Score trend, oldest to newest, on a fixed 0–100 scale. */
export function Sparkline({ scores }: SparklineProps) {
  if (scores.length < 2)
    return <span className="muted small">{scores.length === 1 ? "one log" : "–"}</span>;
  const data = scores.map((s, i) => ({ i, s }));
  return (
    <LineChart width={120} height={32} data={data} data-testid="sparkline">
      <YAxis hide domain={[0, 100]} />
      <Line dataKey="s" stroke="#14313d" strokeWidth={2} dot={false} isAnimationActive={false} />
    </LineChart>
  );
}
