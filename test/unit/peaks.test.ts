import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  localMaxima,
  peakProminence,
  peakWidth,
  quadraticVertex,
  spectralPeaks,
} from "@/lib/signal/peaks";

// Source: scipy.signal.peak_prominences documentation example values, as listed in
// shared/reference-values.md (computed with scipy): x = [0, 3, 1, 2, 0].
describe("peak prominence (scipy.signal.peak_prominences definition)", () => {
  const x = [0, 3, 1, 2, 0];
  it("finds peaks at 1 and 3 with prominences 3 and 1", () => {
    const peaks = localMaxima(x);
    expect(peaks).toEqual([1, 3]);
    const p = peaks.map((i) => peakProminence(x, i));
    expect(p.map((q) => q.prominence)).toEqual([3, 1]);
    expect(p.map((q) => q.leftBase)).toEqual([0, 2]);
    expect(p.map((q) => q.rightBase)).toEqual([4, 4]);
  });
  it("a flat top counts once, at its middle sample (scipy find_peaks plateaus)", () => {
    expect(localMaxima([0, 2, 2, 2, 0])).toEqual([2]);
    expect(localMaxima([0, 2, 2, 0])).toEqual([1]);
    expect(localMaxima([1, 1, 1])).toEqual([]);
  });
});

// Source: scipy.signal.find_peaks / peak_prominences / peak_widths on a seeded random walk,
// written by test/fixtures/make_welch_fixtures.py. Exact indices; widths to 1e-9.
describe("against scipy on a random walk", () => {
  const f = JSON.parse(readFileSync("test/fixtures/peaks-scipy.json", "utf8")) as {
    y: number[];
    peaks: number[];
    prominences: number[];
    leftBases: number[];
    rightBases: number[];
    widths: number[];
  };
  it("same peaks, prominences, bases and half-prominence widths", () => {
    const peaks = localMaxima(f.y);
    expect(peaks).toEqual(f.peaks);
    peaks.forEach((i, n) => {
      const p = peakProminence(f.y, i);
      expect(p.prominence).toBeCloseTo(f.prominences[n] ?? NaN, 9);
      expect(p.leftBase).toBe(f.leftBases[n]);
      expect(p.rightBase).toBe(f.rightBases[n]);
      expect(peakWidth(f.y, i, p)).toBeCloseTo(f.widths[n] ?? NaN, 9);
    });
  });
});

describe("quadratic interpolation (J. O. Smith, Spectral Audio Signal Processing)", () => {
  it("recovers the vertex of a sampled parabola exactly", () => {
    // y = 5 − 2(x − 0.3)² sampled at −1, 0, 1
    const y = (x: number) => 5 - 2 * (x - 0.3) ** 2;
    const v = quadraticVertex(y(-1), y(0), y(1));
    expect(v.offset).toBeCloseTo(0.3, 12);
    expect(v.value).toBeCloseTo(5, 12);
  });
  it("refines a Hann-windowed tone between bins to within 0.1 bin on the dB spectrum", () => {
    // A Hann main lobe in dB is close to a parabola (J. O. Smith, quadratic interpolation of
    // spectral peaks); its error for Hann is a few hundredths of a bin (from memory). We allow 0.1 bin.
    const n = 256;
    const k0 = 40.3;
    const db = new Float64Array(n / 2 + 1);
    for (let k = 0; k <= n / 2; k++) {
      // Hann main lobe magnitude near k0: |W(d)| = |sinc(d)/(1-d²)|
      const d = k - k0;
      const w =
        Math.abs(d) < 1e-9 ? 1 : Math.abs(Math.sin(Math.PI * d) / (Math.PI * d) / (1 - d * d));
      db[k] = 20 * Math.log10(Math.max(w, 1e-12));
    }
    const [peak] = spectralPeaks(db, 1, { minProminenceDb: 3 });
    expect(peak).toBeDefined();
    expect(Math.abs((peak?.freqHz ?? 0) - k0)).toBeLessThan(0.1);
  });
});
