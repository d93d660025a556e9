import { describe, expect, it } from "vitest";
import { planAnalysis } from "@/lib/analysis/plan";
import { DEFAULT_ANALYSIS, type AnalysisSettings } from "@/lib/analysis/settings";
import { WelchBands } from "@/lib/analysis/welch-bands";
import { mulberry32, gaussian } from "@/lib/demo/random";
import type { SampleBlock } from "@/lib/logs/read-log";
import { logInfo } from "../support/log-info";
import { welch } from "@/lib/signal/welch";

const FS = 1000;

/** Seeded noise plus a 120 Hz sine on every axis (generated test data). */
function signal(n: number, seed: number): Float64Array {
  const rand = mulberry32(seed);
  return Float64Array.from(
    { length: n },
    (_, i) => Math.sin((2 * Math.PI * 120 * i) / FS) + 0.3 * gaussian(rand),
  );
}

/** Feeds x (all three axes) and throttle to `bands` in blocks of `blockSize` samples. */
function feed(bands: WelchBands, x: Float64Array, throttle: Float64Array, blockSize: number): void {
  for (let start = 0; start < x.length; start += blockSize) {
    const end = Math.min(x.length, start + blockSize);
    const g = x.subarray(start, end);
    const block: SampleBlock = {
      length: end - start,
      timeS: new Float64Array(end - start),
      gyro: [g, g, g],
      throttle: throttle.subarray(start, end),
      rpm: [],
      setpoint: null,
    };
    bands.push(block);
  }
}

function bandsFor(settings: Partial<AnalysisSettings> = {}, hasThrottle = true) {
  const plan = planAnalysis(logInfo(FS, { hasThrottle }), { ...DEFAULT_ANALYSIS, ...settings });
  return { plan, bands: new WelchBands(plan) };
}

describe("WelchBands: Welch segments from a stream, per throttle band", () => {
  it("the whole-log PSD is welch() of the same samples (mean: exactly), whatever the block size", () => {
    const x = signal(10_000, 1);
    const throttle = new Float64Array(x.length).fill(0.5);
    const reference = welch(x, FS, { nperseg: 512, noverlap: 256 });
    for (const blockSize of [7, 512, 4096]) {
      const { bands } = bandsFor();
      feed(bands, x, throttle, blockSize);
      expect(bands.segments).toBe(reference.segments);
      // The same segments summed in the same order: bit-identical (scipy conventions in welch()).
      expect(Array.from(bands.overallPsd()[0])).toEqual(Array.from(reference.psd));
    }
  });

  it("median averaging keeps the periodograms in float32: welch()'s median within 1e-6 relative", () => {
    const x = signal(10_000, 2);
    const { bands } = bandsFor({ average: "median" });
    feed(bands, x, new Float64Array(x.length).fill(0.5), 1000);
    const reference = welch(x, FS, { nperseg: 512, noverlap: 256, average: "median" });
    bands.overallPsd()[1].forEach((v, k) => {
      const r = reference.psd[k] ?? 0;
      expect(Math.abs(v - r)).toBeLessThanOrEqual(1e-6 * r);
    });
  });

  it("a segment goes to the band of its mean throttle; band time counts samples", () => {
    // 6 s at throttle 0.3 then 4 s at 0.8 (bands 2 and 6 of 8).
    const x = signal(10_000, 3);
    const throttle = Float64Array.from({ length: x.length }, (_, i) => (i < 6000 ? 0.3 : 0.8));
    const { bands } = bandsFor();
    feed(bands, x, throttle, 4096);
    const result = bands.bandSpectra();
    expect(result.map((b) => b.seconds)).toEqual([0, 0, 6, 0, 0, 0, 4, 0]);
    // Segments of 512 every 256 (starts 0, 256, …, 9472): one with k samples at 0.3 has the
    // mean throttle (0.3·k + 0.8·(512 − k)) / 512 and goes to band ⌊8·mean⌋; the segments
    // across the step land in the bands between.
    const expected = new Array<number>(8).fill(0);
    for (let s = 0; s + 512 <= x.length; s += 256) {
      const k = Math.min(512, Math.max(0, 6000 - s));
      const band = Math.floor((8 * (0.3 * k + 0.8 * (512 - k))) / 512);
      expected[band] = (expected[band] ?? 0) + 1;
    }
    expect(result.map((b) => b.segments)).toEqual(expected);
    expect(result[2]?.meanThrottle).toBeCloseTo(0.3, 9);
    expect(result[6]?.meanThrottle).toBeCloseTo(0.8, 9);
    expect(
      result.filter((b) => b.segments === 0).every((b) => Number.isNaN(b.axes.roll.floorDb)),
    ).toBe(true);
    // The 120 Hz sine stands out in both bands' mean spectra (bin 120 / (1000/512) ≈ 61.4).
    for (const b of [result[2], result[6]]) {
      const psd = b?.axes.pitch.psdDb ?? [];
      const at = Math.max(psd[61] ?? -Infinity, psd[62] ?? -Infinity);
      expect(at - (psd[200] ?? 0)).toBeGreaterThan(20);
    }
  });

  it("no segment straddles a gap; without a throttle column there is one band", () => {
    const x = signal(1022, 4);
    const { plan, bands } = bandsFor({}, false);
    expect(plan.throttleBands).toBe(1);
    const zero = new Float64Array(x.length);
    feed(bands, x.subarray(0, 511), zero, 4096);
    bands.gap();
    feed(bands, x.subarray(511), zero, 4096);
    expect(bands.segments).toBe(0);
    feed(bands, x.subarray(0, 1), zero, 4096);
    expect(bands.segments).toBe(1);
  });
});
