import type { Axis } from "../logs/columns";
import type { SpectralPeak } from "../signal/peaks";
import type { LabelledPeak, PeakKind, ThrottleBandResult } from "./types";

/** A band peak counts as the same peak within this share of its frequency (or two bins). */
const SAME_PEAK_FRACTION = 0.03;
/** A structural peak's frequency varies less than this across throttle bands. */
const STRUCTURAL_SPREAD = 0.04;
/** A peak this close to a motor order's frequency is taken as that order. */
const ORDER_MATCH_FRACTION = 0.04;

/**
 * Labels the peaks of a log's overall spectrum. A frame mode stays put while the throttle, and
 * with it every motor order, moves: a peak found at the same frequency in two or more throttle
 * bands is structural. A peak that sits on a motor order's frequency where it shows, or whose
 * frequency climbs with throttle, is motor-driven. Anything else is left unclassified rather than
 * guessed.
 */
export function classifyPeaks(
  peaks: readonly SpectralPeak[],
  axis: Axis,
  bands: readonly ThrottleBandResult[],
  binHz: number,
): LabelledPeak[] {
  return peaks.map((p) => {
    const tolerance = Math.max(SAME_PEAK_FRACTION * p.freqHz, 2 * binHz);
    const sightings: Sighting[] = [];
    for (const band of bands) {
      let best: SpectralPeak | undefined;
      for (const q of band.axes[axis].peaks) {
        const d = Math.abs(q.freqHz - p.freqHz);
        if (d <= tolerance && (!best || d < Math.abs(best.freqHz - p.freqHz))) best = q;
      }
      if (best) sightings.push({ band, freqHz: best.freqHz });
    }
    const kind = kindOf(p, sightings);
    return { ...p, kind, seenInBands: sightings.map((s) => s.band.index) };
  });
}

type Sighting = { band: ThrottleBandResult; freqHz: number };

/** Whether a sighting sits on one of that band's motor orders. */
function onAnOrder({ band, freqHz }: Sighting): boolean {
  return band.motors.some((m) =>
    m.orders.some((o) => Math.abs(o.freqHz - freqHz) <= ORDER_MATCH_FRACTION * freqHz),
  );
}

function kindOf(p: SpectralPeak, sightings: Sighting[]): PeakKind {
  if (sightings.length < 2) return sightings.some(onAnOrder) ? "motor" : "unclassified";
  const freqs = sightings.map((s) => s.freqHz);
  const spread = (Math.max(...freqs) - Math.min(...freqs)) / p.freqHz;
  if (spread > STRUCTURAL_SPREAD) return climbsWithThrottle(sightings) ? "motor" : "unclassified";
  // Orders move with throttle: a peak on an order in every band where it shows is the order.
  return sightings.every(onAnOrder) ? "motor" : "structural";
}

function climbsWithThrottle(sightings: Sighting[]): boolean {
  const sorted = [...sightings].sort((a, b) => a.band.meanThrottle - b.band.meanThrottle);
  for (let i = 1; i < sorted.length; i++) {
    if ((sorted[i]?.freqHz ?? 0) <= (sorted[i - 1]?.freqHz ?? 0)) return false;
  }
  return true;
}
