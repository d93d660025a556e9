import { LogFormatError } from "../errors";
import { formatRate } from "./format";

/**
 * The sample rate of a log, told from the time stamps of its first rows, and the gap rule: a step
 * larger than GAP_FACTOR sample periods splits the log.
 */

export const MIN_SAMPLE_RATE_HZ = 100;
export const MAX_SAMPLE_RATE_HZ = 50_000;
/** A time step larger than this many median steps splits the log. */
export const GAP_FACTOR = 2.5;

/** The time column, named in the sentence for a rate out of range. */
export interface TimeColumn {
  /** 1-based column number. */
  column: number;
  columnName: string | undefined;
}

/**
 * The sample rate (Hz) from the first rows' time stamps (s, from the first row) and the damaged
 * rows before each (see fitSamplePeriod). Throws LogFormatError for fewer than two rows or a rate
 * outside MIN_SAMPLE_RATE_HZ … MAX_SAMPLE_RATE_HZ, naming the time column.
 */
export function sampleRateOf(
  timeS: Float64Array,
  missedBefore: Int32Array,
  where: TimeColumn,
): number {
  if (timeS.length < 2)
    throw new LogFormatError("fewer than two complete sample rows: no sample rate can be told");
  const period = fitSamplePeriod(timeS, missedBefore);
  // Rounded to 9 significant digits, far finer than 4096 stamps resolve: exact rates stay exact.
  const rate = Number((1 / period).toPrecision(9));
  if (!(rate >= MIN_SAMPLE_RATE_HZ && rate <= MAX_SAMPLE_RATE_HZ)) {
    throw new LogFormatError(
      `the time column gives ${formatRate(rate)}, outside ${MIN_SAMPLE_RATE_HZ} Hz – ${MAX_SAMPLE_RATE_HZ / 1000} kHz; check its unit (µs, ms or s)`,
      where,
    );
  }
  return rate;
}

/**
 * The sample period (s) from time stamps (s, from the first row), by least squares: the stamps are
 * cut into runs at gaps (steps over GAP_FACTOR median steps), and one line slope is fitted to all
 * runs at once, each run with its own intercept (the pooled within-run regression of time on sample
 * number). A least-squares slope over n stamps averages their jitter down by about n^1.5, where the
 * median step keeps the jitter and, on integer-µs stamps, the rounding of one step. Sample numbers
 * advance by one per row, and also over damaged rows that left a hole (a step of about two periods).
 */
export function fitSamplePeriod(timeS: Float64Array, missedBefore: Int32Array): number {
  const n = timeS.length;
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) steps[i - 1] = (timeS[i] ?? 0) - (timeS[i - 1] ?? 0);
  steps.sort();
  const median = steps[(n - 2) >> 1] ?? 0;
  if (!(median > 0)) return median;
  const limit = GAP_FACTOR * median;
  let sxx = 0;
  let sxy = 0;
  // Per run: sums of x, y, x², xy relative to the run's first point, to keep the sums small.
  let count = 0;
  let sx = 0;
  let sy = 0;
  let sxxRun = 0;
  let sxyRun = 0;
  let x = 0;
  let x0 = 0;
  let y0 = 0;
  const closeRun = () => {
    if (count > 1) {
      sxx += sxxRun - (sx * sx) / count;
      sxy += sxyRun - (sx * sy) / count;
    }
  };
  for (let i = 0; i < n; i++) {
    const t = timeS[i] ?? 0;
    const step = i > 0 ? t - (timeS[i - 1] ?? 0) : Infinity;
    if (step > limit) {
      closeRun();
      count = 0;
      sx = sy = sxxRun = sxyRun = 0;
      x = 0;
      x0 = 0;
      y0 = t;
    } else {
      const holes = Math.min(missedBefore[i] ?? 0, Math.max(0, Math.round(step / median) - 1));
      x += 1 + holes;
    }
    const dx = x - x0;
    const dy = t - y0;
    count++;
    sx += dx;
    sy += dy;
    sxxRun += dx * dx;
    sxyRun += dx * dy;
  }
  closeRun();
  return sxx > 0 ? sxy / sxx : median;
}
