import Link from "next/link";
import { SpectrumChart } from "@/app/_components/spectrum-chart";
import { ThrottleHeatmap } from "@/app/_components/throttle-heatmap";
import { DEFAULT_ANALYSIS, throttleBandLabel } from "@/lib/analysis/settings";
import type { LogAnalysis } from "@/lib/analysis/types";
import { AXES, type Axis } from "@/lib/logs/columns";
import type { SpectrumPoint } from "@/lib/server/spectrum-view";

export interface SpectraGridProps {
  analysis: LogAnalysis | null;
  spectra: Record<Axis, SpectrumPoint[]>;
  currentLabel?: string;
}

/** One spectrum chart per axis (log against baseline at matched throttle), with the settings in words. */
export function SpectraGrid({ analysis, spectra, currentLabel }: SpectraGridProps) {
  return (
    <>
      <p className="muted small">
        {analysis
          ? `${analysis.sampleRateHz} Hz log, ${analysis.durationS.toFixed(0)} s, Welch ${analysis.settings.window} ${analysis.settings.nperseg}-sample segments (${analysis.settings.binHz.toFixed(2)} Hz bins). PSD in dB re 1 (deg/s)²/Hz. Dots: peaks (dark: structural, amber: motor or unclassified).`
          : "No analysed log yet."}
      </p>
      <div className="grid three">
        {AXES.map((axis) => (
          <div className="card" key={axis}>
            <h3>{axis}</h3>
            <SpectrumChart
              axis={axis}
              currentLabel={currentLabel}
              points={spectra[axis]}
              peaks={(analysis?.axes[axis].peaks ?? []).map((p) => ({
                freqHz: Math.round(p.freqHz * 10) / 10,
                levelDb: p.levelDb,
                kind: p.kind,
              }))}
            />
          </div>
        ))}
      </div>
    </>
  );
}

export interface ThrottleMapCardProps {
  analysis: LogAnalysis | null;
  axis: Axis;
  /** The page's own address; the axis chips add ?axis=… to it. */
  href: string;
}

/** The throttle × frequency map of one axis, with chips to choose the axis. */
export function ThrottleMapCard({ analysis, axis, href }: ThrottleMapCardProps) {
  return (
    <>
      <div className="toolbar">
        {AXES.map((a) => (
          <Link key={a} className="chip" href={`${href}?axis=${a}`} aria-current={a === axis}>
            {a}
          </Link>
        ))}
      </div>
      <div className="card">
        {analysis ? (
          <ThrottleHeatmap
            rows={analysis.throttleBands.map((b) => ({
              label: throttleBandLabel(b.lo, b.hi),
              seconds: b.segments >= DEFAULT_ANALYSIS.minBandSegments ? b.seconds : 0,
              db: b.axes[axis].psdDb,
            }))}
            binHz={analysis.settings.binHz}
            fromHz={analysis.settings.minFreqHz}
            toHz={analysis.settings.maxFreqHz}
          />
        ) : (
          <p className="muted">No analysed log yet.</p>
        )}
      </div>
    </>
  );
}
