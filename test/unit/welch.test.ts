import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { RealPowerSpectrum } from "@/lib/signal/fft";
import { middleOfSorted } from "@/lib/signal/stats";
import {
  PeriodogramAverage,
  defaultNperseg,
  medianBias,
  segmentStarts,
  welch,
  type WelchOptions,
} from "@/lib/signal/welch";
import { enbwBins, makeWindow, windowSums, type WindowName } from "@/lib/signal/windows";
import { mulberry32, gaussian } from "@/lib/demo/random";

interface Fixture {
  name: string;
  fs: number;
  options: Record<string, string | number>;
  x: number[];
  freqHz: number[];
  psd: number[];
}

// Source: scipy.signal.welch, fixtures written by test/fixtures/make_welch_fixtures.py
// (`npm run fixtures`, Debian python3-scipy). Tolerance from the issue: max relative error ≤ 1e-9
// wherever the reference is above 1e-12 of its maximum.
const fixtures = JSON.parse(readFileSync("test/fixtures/welch-scipy.json", "utf8")) as {
  scipy: string;
  cases: Fixture[];
};

function toOptions(o: Fixture["options"]): WelchOptions {
  const windows: Record<string, WindowName> = {
    hann: "hann",
    hamming: "hamming",
    blackmanharris: "blackman-harris",
  };
  return {
    nperseg: Number(o.nperseg),
    noverlap: o.noverlap === undefined ? undefined : Number(o.noverlap),
    window: o.window === undefined ? undefined : windows[String(o.window)],
    average: o.average === "median" ? "median" : "mean",
    scaling: o.scaling === "spectrum" ? "spectrum" : "density",
  };
}

describe(`welch matches scipy.signal.welch (scipy ${fixtures.scipy})`, () => {
  for (const c of fixtures.cases) {
    it(c.name, () => {
      const r = welch(Float64Array.from(c.x), c.fs, toOptions(c.options));
      expect(r.psd.length).toBe(c.psd.length);
      const max = Math.max(...c.psd);
      let worst = 0;
      c.psd.forEach((ref, k) => {
        expect(r.freqHz[k]).toBeCloseTo(c.freqHz[k] ?? NaN, 9);
        if (ref > 1e-12 * max) worst = Math.max(worst, Math.abs((r.psd[k] ?? 0) - ref) / ref);
      });
      expect(worst).toBeLessThanOrEqual(1e-9);
    });
  }
});

describe("window constants (Harris 1978; Heinzel, Rüdiger & Schilling 2002)", () => {
  it("periodic Hann: coherent gain 0.5, ENBW exactly 1.5 bins", () => {
    const w = makeWindow("hann", 1024);
    const { s1 } = windowSums(w);
    expect(s1 / 1024).toBeCloseTo(0.5, 12); // [Hz]: S1/N = 0.5
    expect(enbwBins(w)).toBeCloseTo(1.5, 12); // [Hz]: 1.5000 bins, periodic window
  });
  it("Hamming ENBW 1.3628 bins, 4-term Blackman-Harris 2.0044 bins", () => {
    expect(enbwBins(makeWindow("hamming", 4096))).toBeCloseTo(1.3628, 4); // [Hz] table
    expect(enbwBins(makeWindow("blackman-harris", 4096))).toBeCloseTo(2.0044, 4); // [Hz], [H]
  });
  it("Hann scalloping loss is 1.4236 dB at half a bin", () => {
    // [Hz]: scalloping loss 1.4236 dB. Gain of the window at 0.5 bin offset relative to 0.
    const n = 1024;
    const w = makeWindow("hann", n);
    let re = 0;
    let im = 0;
    for (let i = 0; i < n; i++) {
      re += (w[i] ?? 0) * Math.cos((Math.PI * i) / n);
      im += (w[i] ?? 0) * Math.sin((Math.PI * i) / n);
    }
    const loss = -20 * Math.log10(Math.hypot(re, im) / windowSums(w).s1);
    expect(loss).toBeCloseTo(1.4236, 3);
  });
});

describe("fft.js real transform against a naive DFT", () => {
  it("agrees to 1e-9 relative on a seeded random frame of 64 samples", () => {
    const rand = mulberry32(7);
    const n = 64;
    const x = Float64Array.from({ length: n }, () => rand() - 0.5);
    const fast = new Float64Array(n / 2 + 1);
    new RealPowerSpectrum(n).compute(x, fast);
    let scale = 0;
    for (let k = 0; k <= n / 2; k++) {
      let re = 0;
      let im = 0;
      for (let i = 0; i < n; i++) {
        re += (x[i] ?? 0) * Math.cos((2 * Math.PI * k * i) / n);
        im -= (x[i] ?? 0) * Math.sin((2 * Math.PI * k * i) / n);
      }
      scale = Math.max(scale, re * re + im * im);
      expect(Math.abs((fast[k] ?? 0) - (re * re + im * im))).toBeLessThan(
        1e-9 * Math.max(1, scale),
      );
    }
  });
  it("rejects a length that is not a power of two", () => {
    expect(() => new RealPowerSpectrum(48)).toThrow(/power of two/);
  });
});

describe("closed-form checks of the density scaling", () => {
  const fs = 2000;
  it("Parseval: Σ PSD·Δf equals the variance of the signal within 2 % ([Hz] §9)", () => {
    const rand = mulberry32(11);
    const x = Float64Array.from({ length: 65536 }, () => 3 * gaussian(rand) + 10);
    const r = welch(x, fs, { nperseg: 1024 });
    const df = fs / 1024;
    const total = r.psd.reduce((s, v) => s + v * df, 0);
    let mean = 0;
    for (const v of x) mean += v;
    mean /= x.length;
    let variance = 0;
    for (const v of x) variance += (v - mean) ** 2;
    variance /= x.length;
    expect(Math.abs(total / variance - 1)).toBeLessThan(0.02);
  });
  it("white noise of variance σ² has density 2σ²/fs away from DC and Nyquist (within 3 %)", () => {
    const rand = mulberry32(12);
    const sigma = 1.7;
    const x = Float64Array.from({ length: 1 << 18 }, () => sigma * gaussian(rand));
    const r = welch(x, fs, { nperseg: 512 });
    const inner = Array.from(r.psd.subarray(1, r.psd.length - 1));
    const mean = inner.reduce((s, v) => s + v, 0) / inner.length;
    expect(Math.abs(mean / ((2 * sigma * sigma) / fs) - 1)).toBeLessThan(0.03);
  });
  it("a sine on a bin: density peak (A²/2)/(1.5·fs/N), its power recovered within 1 %", () => {
    const n = 1024;
    const amplitude = 4;
    const f0 = 100 * (fs / n);
    const x = Float64Array.from(
      { length: 16 * n },
      (_, i) => amplitude * Math.sin((2 * Math.PI * f0 * i) / fs),
    );
    const r = welch(x, fs, { nperseg: n });
    const peak = r.psd[100] ?? 0;
    // reference-values.md: density peak = (A²/2)/(1.5·fs/N) for periodic Hann (computed)
    expect(peak / ((amplitude * amplitude) / 2 / (1.5 * (fs / n))) - 1).toBeCloseTo(0, 9);
    const power = [98, 99, 100, 101, 102].reduce((s, k) => s + (r.psd[k] ?? 0) * (fs / n), 0);
    expect(Math.abs(power / ((amplitude * amplitude) / 2) - 1)).toBeLessThan(0.01);
  });
  it("spectrum scaling of the same sine peaks at A²/2 (power spectrum, [Hz])", () => {
    const n = 512;
    const x = Float64Array.from(
      { length: 8 * n },
      (_, i) => 2 * Math.sin((2 * Math.PI * 64 * i) / n),
    );
    const r = welch(x, fs, { nperseg: n, scaling: "spectrum" });
    expect(r.psd[64]).toBeCloseTo(2, 9);
  });
});

describe("Welch options and errors", () => {
  it("median bias b(n) = 1, 1, 0.8333, 0.8333, 0.7833 for n = 1..5 (scipy _median_bias)", () => {
    expect([1, 2, 3, 4, 5].map((n) => medianBias(n))).toEqual(
      [1, 1, 1 - 1 / 6, 1 - 1 / 6, 1 - 1 / 6 + 1 / 5 - 1 / 4].map((v) => expect.closeTo(v, 12)),
    );
    expect(medianBias(5)).toBeCloseTo(0.7833, 4);
    expect(medianBias(100001)).toBeCloseTo(Math.log(2), 4);
  });
  it("default segment keeps bins ≤ 2 Hz", () => {
    expect(defaultNperseg(1000)).toBe(512);
    expect(defaultNperseg(4000)).toBe(2048);
    expect(defaultNperseg(8000)).toBe(4096);
    expect(4000 / defaultNperseg(4000)).toBeLessThanOrEqual(2);
  });
  it("rejects a signal shorter than one segment and bad sizes, with plain messages", () => {
    expect(() => welch(new Float64Array(100), 1000, { nperseg: 256 })).toThrow(
      /shorter than one segment of 256/,
    );
    expect(() => welch(new Float64Array(1000), 1000, { nperseg: 300 })).toThrow(/power of two/);
    expect(() => welch(new Float64Array(1000), 1000, { nperseg: 256, noverlap: 256 })).toThrow(
      /noverlap/,
    );
    expect(() => welch(new Float64Array(1000), 0)).toThrow(/sample rate/);
  });
  it("segments never straddle runs", () => {
    const x = new Float64Array(1000);
    const r = welch(x, 1000, { nperseg: 256 }, [
      { start: 0, end: 400 },
      { start: 400, end: 1000 },
    ]);
    // Run 0..400 holds segments at 0 and 128; run 400..1000 at 400, 528 and 656: 5 in all. One
    // run over the whole signal would give 6 (0, 128, …, 640), one of them across sample 400.
    expect(r.segments).toBe(5);
    expect(
      segmentStarts(
        [
          { start: 0, end: 400 },
          { start: 400, end: 1000 },
        ],
        256,
        128,
      ),
    ).toEqual([0, 128, 400, 528, 656]);
  });
});

describe("PeriodogramAverage (the one Welch average)", () => {
  const spectra = [
    [1, 10, 4],
    [3, 20, 8],
    [2, 60, 6],
    [8, 30, 2],
  ].map((v) => Float64Array.from(v));
  const averaged = (average: "mean" | "median", count: number, keep?: "float32") => {
    const avg = new PeriodogramAverage(3, average, keep);
    for (const s of spectra.slice(0, count)) avg.add(s);
    return Array.from(avg.result());
  };

  it("mean: the bin-wise arithmetic mean (hand-computed)", () => {
    expect(averaged("mean", 4)).toEqual([3.5, 30, 5]);
  });
  it("median: bin-wise median over the bias b(n) (scipy csd: median / _median_bias)", () => {
    // Three spectra: the middle values 2, 20, 6 over b(3) = 1 − 1/6.
    expect(averaged("median", 3)).toEqual([2, 20, 6].map((v) => expect.closeTo(v / (5 / 6), 12)));
    // Four: the mean of the two middle values (numpy's median), over b(4) = 1 − 1/6.
    expect(averaged("median", 4)).toEqual([2.5, 25, 5].map((v) => expect.closeTo(v / (5 / 6), 12)));
  });
  it("median kept in float32 agrees to float32 precision (relative 1e-7)", () => {
    const f64 = averaged("median", 4);
    averaged("median", 4, "float32").forEach((v, k) =>
      expect(Math.abs(v / (f64[k] ?? 1) - 1)).toBeLessThan(1e-7),
    );
  });
  it("nothing added gives zeros, and the input is copied, not kept", () => {
    expect(averaged("median", 0)).toEqual([0, 0, 0]);
    expect(averaged("mean", 0)).toEqual([0, 0, 0]);
    const avg = new PeriodogramAverage(2, "median");
    const p = Float64Array.from([1, 2]);
    avg.add(p);
    p[0] = 99;
    expect(Array.from(avg.result())).toEqual([1, 2]);
    expect(avg.count).toBe(1);
  });
});

describe("middleOfSorted (the one median rule)", () => {
  it("odd: the middle value; even: the mean of the two middle values; none: NaN (numpy.median)", () => {
    expect(middleOfSorted([1, 2, 9])).toBe(2);
    expect(middleOfSorted(Float64Array.from([1, 2, 4, 9]))).toBe(3);
    expect(middleOfSorted([])).toBeNaN();
  });
});
