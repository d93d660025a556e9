import { describe, expect, it } from "vitest";
import { mulberry32 } from "@/lib/demo/random";
import { LogFormatError } from "@/lib/errors";
import {
  GAP_FACTOR,
  MAX_SAMPLE_RATE_HZ,
  MIN_SAMPLE_RATE_HZ,
  fitSamplePeriod,
  sampleRateOf,
} from "@/lib/logs/sample-rate";

// The rate is a least-squares slope of time on sample number (ordinary least squares; the slope's
// standard error for n equally spaced points with independent errors of standard deviation σ is
// σ·√(12/n³), a textbook result of linear regression).
const TIME_COLUMN = { column: 1, columnName: "time_us" };

describe("the sample period from a line fit of the time stamps", () => {
  it("exact stamps give the exact period, whatever the first stamp", () => {
    const t = Float64Array.from({ length: 1000 }, (_, k) => k * 250e-6);
    expect(fitSamplePeriod(t, new Int32Array(1000))).toBeCloseTo(250e-6, 18);
  });
  it("heavy jitter on integer-µs stamps: within 2e-5, where the median step is 0.4 % off", () => {
    // Ordinary least squares: the slope's standard error is σ·√(12/n³) for n equally spaced points
    // with independent errors of standard deviation σ; here σ = 80/√12 µs, n = 4096, step 124.5 µs,
    // so about 2.5e-6 relative; the tolerance 2e-5 is 8 of them.
    const rand = mulberry32(5);
    const n = 4096;
    const step = 124.5;
    const t = new Float64Array(n).map((_, k) => Math.round(k * step + (rand() - 0.5) * 80) * 1e-6);
    t.forEach((v, k) => (t[k] = v - (t[0] ?? 0)));
    const period = fitSamplePeriod(t, new Int32Array(n));
    expect(Math.abs(period / (step * 1e-6) - 1)).toBeLessThan(2e-5);
    const steps = Array.from({ length: n - 1 }, (_, k) => (t[k + 1] ?? 0) - (t[k] ?? 0)).sort(
      (a, b) => a - b,
    );
    const median = steps[(n - 2) >> 1] ?? 0;
    expect(Math.abs(median / (step * 1e-6) - 1)).toBeGreaterThan(3e-3); // the method it replaces
  });
  it("runs between gaps share one slope; damaged rows that left a hole count as missing samples", () => {
    const t: number[] = [];
    const missed: number[] = [];
    for (let k = 0; k < 3000; k++) {
      if (k % 100 === 50) continue; // a damaged row: the sample is missing
      t.push((k < 1500 ? k : k + 400) * 500e-6); // and a 0.2 s gap in the middle
      missed.push(k % 100 === 51 ? 1 : 0);
    }
    expect(fitSamplePeriod(Float64Array.from(t), Int32Array.from(missed))).toBeCloseTo(500e-6, 15);
  });
  it("a step of more than GAP_FACTOR median steps starts a new run, with its own intercept", () => {
    expect(GAP_FACTOR).toBe(2.5);
    // Two runs at 1 ms whose second starts 2.6 steps after the first ends: both keep the slope.
    const t = [0, 1e-3, 2e-3, 3e-3, 5.6e-3, 6.6e-3, 7.6e-3, 8.6e-3];
    expect(fitSamplePeriod(Float64Array.from(t), new Int32Array(8))).toBeCloseTo(1e-3, 15);
  });
});

describe("the sample rate and its range", () => {
  it("is rounded to 9 significant digits, so exact rates stay exact", () => {
    const t = Float64Array.from({ length: 4096 }, (_, k) => (k * 1) / 3000);
    expect(sampleRateOf(t, new Int32Array(4096), TIME_COLUMN)).toBe(3000);
  });
  it("accepts 100 Hz … 50 kHz and names the time column outside it", () => {
    expect([MIN_SAMPLE_RATE_HZ, MAX_SAMPLE_RATE_HZ]).toEqual([100, 50_000]);
    const at = (hz: number) => Float64Array.from({ length: 100 }, (_, k) => k / hz);
    expect(sampleRateOf(at(100), new Int32Array(100), TIME_COLUMN)).toBe(100);
    expect(sampleRateOf(at(50_000), new Int32Array(100), TIME_COLUMN)).toBe(50_000);
    expect(() => sampleRateOf(at(99), new Int32Array(100), TIME_COLUMN)).toThrow(
      "column 1 (time_us): the time column gives 99 Hz, outside 100 Hz – 50 kHz; check its unit (µs, ms or s)",
    );
    expect(() => sampleRateOf(at(60_000), new Int32Array(100), TIME_COLUMN)).toThrow(
      /gives 60 kHz, outside/,
    );
  });
  it("needs two rows, and a time step above zero", () => {
    expect(() => sampleRateOf(new Float64Array(1), new Int32Array(1), TIME_COLUMN)).toThrow(
      LogFormatError,
    );
    expect(() => sampleRateOf(new Float64Array(5), new Int32Array(5), TIME_COLUMN)).toThrow(
      /gives no usable time step/,
    );
  });
});
