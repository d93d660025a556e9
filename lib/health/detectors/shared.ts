import type { ThrottleBandResult } from "../../analysis/types";
import { foldedHz } from "../../signal/folding";
import { median } from "../../signal/stats";
import type { Baseline, BaselineThrottleBand } from "../baseline";
import type { Finding } from "../findings";
import { penaltyFor, stepOf, type HealthThresholds, type StepThresholds } from "../thresholds";

/**
 * 10/ln 10 dB: the standard deviation, in dB, of one block's power of a noise-like order is about
 * this (the power of a demodulated noise bin is χ² with 2 degrees of freedom, i.e. exponential;
 * Welch 1967, and the delta method for 10·log10), so a mean over N blocks scatters 4.34/√N dB.
 */
export const DB_PER_UNIT_LOG = 10 / Math.LN10;

/**
 * A band's order level is the median of its blocks' powers (lib/analysis/order-bands.ts). For
 * exponential (noise-like) block powers of mean μ the sample median of N scatters μ/√N about
 * μ·ln 2 (asymptotic variance of a sample median, 1/(4N·f(m)²)), i.e. 1/ln 2 ≈ 1.44 times the
 * mean's relative scatter: its standard deviation is DB_PER_UNIT_LOG·MEDIAN_SCATTER/√N dB.
 */
export const MEDIAN_SCATTER = 1 / Math.LN2;

/** Median absolute deviation to standard deviation for normal data (Rousseeuw & Croux 1993). */
const MAD_TO_SIGMA = 1.4826;
/** No yardstick is tighter than this, dB: below it a log's quantisation and rounding show. */
const MIN_ROBUST_SIGMA_DB = 0.5;

/** 1.4826 × MAD: a robust standard deviation (Rousseeuw & Croux 1993), at least 0.5 dB. */
export function robustSigma(values: readonly number[]): number {
  const e = values.filter(Number.isFinite);
  const med = median(e);
  return Math.max(MIN_ROBUST_SIGMA_DB, MAD_TO_SIGMA * median(e.map((x) => Math.abs(x - med))));
}

/** The step a magnitude reaches and the points it costs, or null below watch. */
export function graded(
  magnitude: number,
  t: StepThresholds,
  h: HealthThresholds,
): Pick<Finding, "severity" | "points"> | null {
  const severity = stepOf(magnitude, t);
  return severity ? { severity, points: penaltyFor(magnitude, t, h) } : null;
}

/** Frequencies of the motors' whole orders in a throttle band of the log, Hz. */
export function wholeOrderFreqs(band: ThrottleBandResult): number[] {
  return band.motors
    .flatMap((x) => x.orders.filter((o) => Number.isInteger(o.order)).map((o) => o.freqHz))
    .filter((f) => f > 0);
}

/** The motors of one airframe spin this far apart (fraction of an order's frequency). */
const MOTOR_SPREAD_FRACTION = 0.02;

/** Where a motor order shows in a throttle band's spectrum and how far it sweeps there, Hz. */
export interface OrderSpan {
  atHz: number;
  halfWidthHz: number;
}

/**
 * The spans the given orders (frequencies at the band's mean rpm) sweep in a throttle band of a
 * log sampled at `sampleRateHz`. Within a band each order sweeps as rpm does, rpm ∝ √throttle
 * (thrust ∝ rpm²): a half-width of (√hi − √lo)/(√hi + √lo) of its frequency around its mean, and
 * MOTOR_SPREAD_FRACTION for the motors' spread; folded where above the Nyquist frequency (the
 * width in hertz stays).
 */
export function orderSpans(
  band: Pick<ThrottleBandResult, "lo" | "hi">,
  freqsHz: readonly number[],
  sampleRateHz: number,
): OrderSpan[] {
  const sweep =
    (Math.sqrt(band.hi) - Math.sqrt(band.lo)) / (Math.sqrt(band.hi) + Math.sqrt(band.lo)) +
    MOTOR_SPREAD_FRACTION;
  return freqsHz
    .filter((f) => f > 0)
    .map((f) => ({ atHz: foldedHz(f, sampleRateHz), halfWidthHz: sweep * f }));
}

/** Whether `freqHz` lies within one of the spans. */
export function inAnOrderSpan(spans: readonly OrderSpan[], freqHz: number): boolean {
  return spans.some((s) => Math.abs(s.atHz - freqHz) <= s.halfWidthHz);
}

/**
 * The frequencies of the motors' whole orders in a throttle band that show in a log sampled at
 * `sampleRateHz`, Hz: those below its Nyquist frequency, and 1× and 2× above it, which show
 * folded (the blade pass and 4× up there have passed the flight controller's low-passes tens of
 * dB down; as in lib/analysis/order-tracker.ts, they are not followed).
 */
export function wholeOrderTrueFreqs(band: ThrottleBandResult, sampleRateHz: number): number[] {
  return band.motors.flatMap((x) =>
    x.orders
      .filter(
        (o) =>
          Number.isInteger(o.order) &&
          o.freqHz > 0 &&
          (o.freqHz <= sampleRateHz / 2 || o.order <= MAX_FOLDED_ORDER),
      )
      .map((o) => o.freqHz),
  );
}

/** The highest order taken to show folded (lib/analysis/order-tracker.ts follows 1× and 2×). */
const MAX_FOLDED_ORDER = 2;

/**
 * Baseline value at the log band's own mean throttle: linear in throttle between the baseline's
 * neighbouring bands, so a band flown a little harder is held to a slightly higher level.
 */
export function atThrottle(
  baseline: Baseline,
  throttle: number,
  value: (b: BaselineThrottleBand) => number,
): number {
  const points = baseline.throttleBands
    .map((b) => ({ x: b.meanThrottle, y: value(b) }))
    .filter((p) => Number.isFinite(p.y))
    .sort((a, b) => a.x - b.x);
  const first = points[0];
  const last = points[points.length - 1];
  if (!first || !last) return Number.NaN;
  if (throttle <= first.x) return first.y;
  if (throttle >= last.x) return last.y;
  for (let i = 1; i < points.length; i++) {
    const p = points[i - 1];
    const q = points[i];
    if (p && q && throttle <= q.x) return p.y + ((q.y - p.y) * (throttle - p.x)) / (q.x - p.x);
  }
  return last.y;
}
