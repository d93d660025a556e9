import { describe, expect, it } from "vitest";
import { mulberry32 } from "@/lib/demo/random";
import { RunningMedian } from "@/lib/signal/running-median";
import { median } from "@/lib/signal/stats";

// The order levels' median in constant memory: exact for short streams, then the P² estimate
// (Jain & Chlamtac, Communications of the ACM 28 (10), 1985). Reference values: the sample median
// by sorting (lib/signal/stats.ts), and the exponential distribution's median μ·ln 2.

function fed(values: readonly number[]): RunningMedian {
  const m = new RunningMedian();
  for (const v of values) m.push(v);
  return m;
}

describe("RunningMedian", () => {
  it("is the sorted median exactly while it holds up to 32 values, NaN skipped", () => {
    const rand = mulberry32(7);
    for (const n of [1, 2, 5, 16, 31, 32]) {
      const values = Array.from({ length: n }, () => rand() * 100);
      expect(fed([...values, Number.NaN]).value()).toBe(median(values));
    }
    expect(new RunningMedian().value()).toBeNaN();
  });

  it("tracks a long stream's median: 20,000 exponential powers in dB within 0.1 dB of 10·log10(ln 2)", () => {
    const rand = mulberry32(11);
    const db = Array.from({ length: 20000 }, () => 10 * Math.log10(-Math.log(1 - rand())));
    const m = fed(db);
    expect(m.size).toBe(20000);
    // Exponential of mean 1: median ln 2 = −1.592 dB. P² is an estimate: 0.1 dB stated here.
    expect(Math.abs(m.value() - 10 * Math.log10(Math.LN2))).toBeLessThan(0.1);
    // And within 0.1 dB of the same sample's exact median.
    expect(Math.abs(m.value() - median(db))).toBeLessThan(0.1);
  });

  it("is not moved by a minority of outliers in a long stream (a tenth of the blocks 30 dB up)", () => {
    const rand = mulberry32(13);
    const values = Array.from({ length: 5000 }, (_, i) => (i % 10 === 3 ? 30 : 0) + rand() - 0.5);
    // The sorted median of this sample is within the uniform noise around 0 (|x| < 0.5) …
    expect(Math.abs(median(values))).toBeLessThan(0.5);
    // … and the estimate is within 0.1 of it.
    expect(Math.abs(fed(values).value() - median(values))).toBeLessThan(0.1);
  });
});
