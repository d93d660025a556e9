import type { LogAnalysis } from "../analysis/types";
import type { Assessment } from "../health/compare";
import { axisRecord, type Axis } from "../logs/columns";
import { round } from "../signal/stats";

/**
 * The documented, stable JSON the CLI prints with --json (see README, "JSON output").
 * Fields are only ever added, never renamed or removed, within a major version.
 */

export interface AnalyzeJson {
  sampleRateHz: number;
  durationS: number;
  samples: number;
  gaps: { line: number; atS: number; lengthS: number }[];
  droppedRows: number;
  metadata: Record<string, string>;
  guesses: string[];
  settings: LogAnalysis["settings"];
  axes: Record<
    Axis,
    {
      freqHz: number[];
      psd: number[];
      peaks: { freqHz: number; psd: number; prominenceDb: number; widthHz: number; kind: string }[];
      bands: { loHz: number; hiHz: number; power: number; rms: number }[];
      floorDb: number;
      rmsDegS: number;
    }
  >;
  throttleBands: {
    lo: number;
    hi: number;
    seconds: number;
    segments: number;
    meanThrottle: number;
  }[];
  motors: { motor: number; meanRpm: number }[];
}

export function analyzeJson(a: LogAnalysis): AnalyzeJson {
  const axes: AnalyzeJson["axes"] = axisRecord((axis) => {
    const r = a.axes[axis];
    return {
      freqHz: a.freqHz,
      // As computed (full double precision): a user checking against scipy.signal.welch sees
      // the engine's own error (≤ 1e-9 relative), not a rounding of ours.
      psd: r.psd,
      peaks: r.peaks.map((p) => ({
        freqHz: round(p.freqHz, 2),
        psd: 10 ** (p.levelDb / 10),
        prominenceDb: round(p.prominenceDb, 2),
        widthHz: round(p.widthHz, 2),
        kind: p.kind,
      })),
      bands: a.bands.map((b, i) => {
        const power = r.bandPower[i] ?? 0;
        return { loHz: b.loHz, hiHz: b.hiHz, power, rms: Math.sqrt(power) };
      }),
      floorDb: r.floorDb,
      rmsDegS: r.rmsDegS,
    };
  });
  return {
    sampleRateHz: a.sampleRateHz,
    durationS: a.durationS,
    samples: a.samples,
    gaps: a.gaps,
    droppedRows: a.droppedRows,
    metadata: a.metadata,
    guesses: a.guesses,
    settings: a.settings,
    axes,
    throttleBands: a.throttleBands.map((b) => ({
      lo: b.lo,
      hi: b.hi,
      seconds: b.seconds,
      segments: b.segments,
      meanThrottle: b.meanThrottle,
    })),
    motors: a.motors.map((m) => ({ motor: m.motor, meanRpm: m.meanRpm })),
  };
}

export interface CompareJson {
  score: number | null;
  status: string;
  findings: {
    axis: Axis;
    kind: string;
    freqHz: number;
    baselineFreqHz?: number;
    deltaDb?: number;
    shiftPct?: number;
    motor?: number;
    severity: string;
    points: number;
    text: string;
  }[];
  notCompared: { what: string; reason: string }[];
  comparedBands: string[];
}

export function compareJson(a: Assessment): CompareJson {
  return {
    score: Number.isFinite(a.score) ? a.score : null,
    status: a.status,
    findings: a.findings.map((f) => ({ ...f })),
    notCompared: a.notCompared,
    comparedBands: a.comparedBands,
  };
}
