import { middleOfSorted } from "./stats";

/**
 * The median of a stream in constant memory: exact (`middleOfSorted`) while it holds at most
 * EXACT_LIMIT values, then the P² estimate of Jain & Chlamtac ("The P² algorithm for dynamic
 * calculation of quantiles and histograms without storing observations", Communications of the
 * ACM 28 (10), 1985): five markers at the minimum, the quartiles, the median and the maximum,
 * moved by piecewise-parabolic interpolation as values arrive. An order level takes the median of
 * every block of a log; a log of hours has tens of thousands of blocks per motor and order, which
 * must not be kept.
 */

/** Values kept exactly before the stream switches to the P² markers. */
const EXACT_LIMIT = 32;
/** Increments of the markers' desired positions per value, for the median (p = 0.5). */
const DESIRED_STEP = [0, 0.25, 0.5, 0.75, 1] as const;
const NO_MARKERS = new Float64Array(0);

export class RunningMedian {
  private held: number[] = [];
  /**
   * Once past EXACT_LIMIT: marker heights, positions (0-based) and desired positions. Allocated
   * only then: a log makes tens of thousands of these, most of which never hold 32 values.
   */
  private heights: Float64Array | null = null;
  private positions: Float64Array = NO_MARKERS;
  private desired: Float64Array = NO_MARKERS;
  private count = 0;

  /** Adds a value; NaN is skipped. */
  push(x: number): void {
    if (Number.isNaN(x)) return;
    this.count++;
    if (!this.heights) {
      this.held.push(x);
      if (this.held.length > EXACT_LIMIT) this.startMarkers();
      return;
    }
    this.update(this.heights, x);
  }

  /** Values pushed (NaN not counted). */
  get size(): number {
    return this.count;
  }

  /** The median so far: exact up to EXACT_LIMIT values, the P² estimate beyond; NaN for none. */
  value(): number {
    if (this.heights) return this.heights[2] ?? Number.NaN;
    return middleOfSorted([...this.held].sort((a, b) => a - b));
  }

  /** Places the five markers on the held values' order statistics. */
  private startMarkers(): void {
    const sorted = [...this.held].sort((a, b) => a - b);
    const last = sorted.length - 1;
    const heights = new Float64Array(5);
    this.positions = new Float64Array(5);
    this.desired = new Float64Array(5);
    for (let i = 0; i < 5; i++) {
      const pos = Math.round((DESIRED_STEP[i] ?? 0) * last);
      this.positions[i] = pos;
      this.desired[i] = (DESIRED_STEP[i] ?? 0) * last;
      heights[i] = sorted[pos] ?? 0;
    }
    this.heights = heights;
    this.held = [];
  }

  private update(q: Float64Array, x: number): void {
    const n = this.positions;
    // The cell the value falls in; the extreme markers follow new extremes.
    let k: number;
    if (x < (q[0] ?? 0)) {
      q[0] = x;
      k = 0;
    } else if (x >= (q[4] ?? 0)) {
      q[4] = x;
      k = 3;
    } else {
      k = 0;
      while (k < 3 && x >= (q[k + 1] ?? 0)) k++;
    }
    for (let i = k + 1; i < 5; i++) n[i] = (n[i] ?? 0) + 1;
    for (let i = 0; i < 5; i++) this.desired[i] = (this.desired[i] ?? 0) + (DESIRED_STEP[i] ?? 0);
    for (let i = 1; i <= 3; i++) {
      const d = (this.desired[i] ?? 0) - (n[i] ?? 0);
      const up = (n[i + 1] ?? 0) - (n[i] ?? 0);
      const down = (n[i - 1] ?? 0) - (n[i] ?? 0);
      if ((d >= 1 && up > 1) || (d <= -1 && down < -1)) {
        const s = d >= 0 ? 1 : -1;
        const p = parabolic(q, n, i, s);
        q[i] =
          (q[i - 1] ?? 0) < p && p < (q[i + 1] ?? 0)
            ? p
            : (q[i] ?? 0) + (s * ((q[i + s] ?? 0) - (q[i] ?? 0))) / ((n[i + s] ?? 0) - (n[i] ?? 0));
        n[i] = (n[i] ?? 0) + s;
      }
    }
  }
}

/** The P² piecewise-parabolic prediction of marker i moved by s (±1) positions. */
function parabolic(q: Float64Array, n: Float64Array, i: number, s: number): number {
  const qi = q[i] ?? 0;
  const ni = n[i] ?? 0;
  const qUp = q[i + 1] ?? 0;
  const qDown = q[i - 1] ?? 0;
  const nUp = n[i + 1] ?? 0;
  const nDown = n[i - 1] ?? 0;
  return (
    qi +
    (s / (nUp - nDown)) *
      (((ni - nDown + s) * (qUp - qi)) / (nUp - ni) +
        ((nUp - ni - s) * (qi - qDown)) / (ni - nDown))
  );
}
