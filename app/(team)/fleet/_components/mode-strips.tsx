import type { ModeStrip } from "@/lib/server/fleet";

export interface ModeStripsProps {
  design: string;
  airframes: number;
  enough: boolean;
  strips: ModeStrip[];
}

const WIDTH = 640;
const ROW = 46;
const LEFT = 150;
const RIGHT = 20;

/**
 * One strip per fleet mode: every airframe's baseline frequency as a dot, the fleet's normal range
 * (median ± 3.5 robust σ) shaded, so the odd one out is seen at a glance. An outlier is drawn as a
 * hollow diamond with its name, so it reads without colour.
 */
export function ModeStrips({ design, airframes, enough, strips }: ModeStripsProps) {
  if (strips.length === 0)
    return <p className="muted">No mode is shared by enough baselines of {design} yet.</p>;
  const height = strips.length * ROW + 24;
  return (
    <figure className="chart mode-strips">
      <svg
        viewBox={`0 0 ${WIDTH} ${height}`}
        width="100%"
        role="img"
        aria-label={`mode frequencies of the ${design} fleet`}
        data-testid="mode-strips"
      >
        {strips.map((s, i) => {
          const freqs = [...s.dots.map((d) => d.freqHz), s.loHz, s.hiHz];
          const lo = Math.min(...freqs) * 0.98;
          const hi = Math.max(...freqs) * 1.02;
          const x = (f: number) => LEFT + ((f - lo) / (hi - lo)) * (WIDTH - LEFT - RIGHT);
          const y = i * ROW + 20;
          return (
            <g key={`${s.axis}-${s.medianHz}`}>
              <text x={0} y={y + 4} fontSize={12} fill="var(--ink)">
                {s.axis} mode ~{Math.round(s.medianHz)} Hz
              </text>
              <rect
                x={x(s.loHz)}
                y={y - 9}
                width={Math.max(2, x(s.hiHz) - x(s.loHz))}
                height={18}
                fill="#dfe8ea"
              />
              <line
                x1={x(s.medianHz)}
                x2={x(s.medianHz)}
                y1={y - 11}
                y2={y + 11}
                stroke="var(--accent)"
                strokeWidth={2}
              />
              <line x1={LEFT} x2={WIDTH - RIGHT} y1={y} y2={y} stroke="var(--line)" />
              <text x={LEFT} y={y + 20} fontSize={9} fill="var(--muted)">
                {Math.round(lo)} Hz
              </text>
              <text x={WIDTH - RIGHT} y={y + 20} fontSize={9} fill="var(--muted)" textAnchor="end">
                {Math.round(hi)} Hz
              </text>
              {s.dots.map((d) =>
                d.outlier ? (
                  <g key={d.name}>
                    <rect
                      x={x(d.freqHz) - 5}
                      y={y - 5}
                      width={10}
                      height={10}
                      transform={`rotate(45 ${x(d.freqHz)} ${y})`}
                      fill="#fff"
                      stroke="var(--ground)"
                      strokeWidth={2.5}
                    />
                    <text
                      x={x(d.freqHz)}
                      y={y - 12}
                      fontSize={11}
                      textAnchor="middle"
                      fill="var(--ground)"
                      fontWeight={700}
                    >
                      {d.name} {Math.round(d.freqHz)} Hz
                    </text>
                  </g>
                ) : (
                  <circle
                    key={d.name}
                    cx={x(d.freqHz)}
                    cy={y}
                    r={4.5}
                    fill="var(--accent)"
                    fillOpacity={0.75}
                  >
                    <title>{`${d.name}: ${d.freqHz.toFixed(1)} Hz`}</title>
                  </circle>
                ),
              )}
            </g>
          );
        })}
      </svg>
      <figcaption className="muted small">
        Baseline mode frequencies of {airframes} airframe{airframes === 1 ? "" : "s"} of {design}.
        Shaded: the fleet&apos;s normal range (median ± 3.5 robust standard deviations); line:
        median.
        {enough
          ? ""
          : " Fewer than three airframes: not enough to judge any of them against the fleet."}
      </figcaption>
    </figure>
  );
}
