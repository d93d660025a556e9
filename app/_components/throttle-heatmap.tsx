import { rampColour } from "@/lib/view/colour-ramp";

export interface ThrottleHeatmapProps {
  /** Rows from low to high throttle: label, seconds, dB values on a uniform grid. */
  rows: { label: string; seconds: number; db: number[] }[];
  binHz: number;
  fromHz: number;
  toHz: number;
}

const colour = rampColour;
// The legend samples the same ramp the cells use.
const LEGEND = Array.from({ length: 9 }, (_, i) => rampColour(i / 8)).join(",");

const COLUMNS = 160;

/** Throttle × frequency map of one axis: where in the throttle range each frequency shakes. SVG, no script. */
export function ThrottleHeatmap({ rows, binHz, fromHz, toHz }: ThrottleHeatmapProps) {
  const used = rows.filter((r) => r.seconds > 0 && r.db.length > 0);
  if (used.length === 0) return <p className="muted">No throttle data in the latest log.</p>;
  const first = Math.ceil(fromHz / binHz);
  const last = Math.floor(toHz / binHz);
  const step = Math.max(1, Math.ceil((last - first) / COLUMNS));
  const cells = used.map((r) => {
    const values: number[] = [];
    for (let k = first; k <= last; k += step) {
      let m = -Infinity;
      for (let j = k; j < Math.min(k + step, last + 1); j++) m = Math.max(m, r.db[j] ?? -Infinity);
      values.push(m);
    }
    return values;
  });
  const all = cells
    .flat()
    .filter(Number.isFinite)
    .sort((a, b) => a - b);
  const lo = all[Math.floor(all.length * 0.05)] ?? 0;
  const hi = all[Math.floor(all.length * 0.995)] ?? 1;
  const width = 760;
  const rowH = 26;
  const left = 86;
  const cols = cells[0]?.length ?? 1;
  const cw = (width - left) / cols;
  const height = used.length * rowH + 26;
  const spacing = toHz > 1200 ? 250 : 100;
  const ticks = Array.from(
    { length: Math.floor(toHz / spacing) },
    (_, i) => (i + 1) * spacing,
  ).filter((f) => f >= fromHz && f <= toHz);
  return (
    <figure className="chart">
      <svg
        viewBox={`0 0 ${width} ${height}`}
        width="100%"
        role="img"
        aria-label="throttle by frequency vibration map"
        data-testid="heatmap"
      >
        {[...used].reverse().map((r, ri) => {
          const values = cells[used.length - 1 - ri] ?? [];
          return (
            <g key={r.label}>
              <text
                x={left - 6}
                y={ri * rowH + rowH * 0.65}
                textAnchor="end"
                fontSize="11"
                fill="#56666e"
              >
                {r.label}
              </text>
              {values.map((v, ci) => (
                <rect
                  key={ci}
                  x={left + ci * cw}
                  y={ri * rowH}
                  width={cw + 0.5}
                  height={rowH - 1}
                  fill={Number.isFinite(v) ? colour((v - lo) / (hi - lo)) : "#eee"}
                />
              ))}
            </g>
          );
        })}
        {ticks.map((f) => {
          const x = left + ((f / binHz - first) / step) * cw;
          return (
            <text key={f} x={x} y={height - 8} fontSize="11" textAnchor="middle" fill="#56666e">
              {f} Hz
            </text>
          );
        })}
      </svg>
      <figcaption className="heatmap-legend">
        throttle (rows) × frequency (linear); colour from {lo.toFixed(0)} dB
        {/* The legend's gradient is the colour ramp itself (lib/view), so it stays inline. */}
        <span className="legend-ramp" style={{ background: `linear-gradient(90deg, ${LEGEND})` }} />
        to {hi.toFixed(0)} dB
      </figcaption>
    </figure>
  );
}
