import { describe, expect, it } from "vitest";
import { OrderTracker, type MaskReason } from "@/lib/analysis/order-tracker";
import { TELEMETRY_LIMITS, trackedOrders } from "@/lib/analysis/settings";

function set(a: Float64Array | undefined, i: number, v: number): void {
  if (a) a[i] = v;
}

/** Runs the tracker over generated samples; returns per block the powers and mask reasons. */
function track(
  fs: number,
  seconds: number,
  rpmOf: (m: number, t: number, i: number) => number,
  gyroOf: (t: number, angles: number[]) => number,
  motors = 1,
) {
  const blocks: {
    power: number[][][];
    side: number[][][];
    masked: (MaskReason | null)[];
    rotationHz: number[];
  }[] = [];
  const orders = trackedOrders(3);
  const tracker = new OrderTracker(fs, motors, orders, 40, 0.45 * fs, TELEMETRY_LIMITS, (b) =>
    blocks.push({
      power: b.power.map((m) => m.map((o) => Array.from(o))),
      side: b.side.map((m) => m.map((o) => Array.from(o))),
      masked: [...b.masked],
      rotationHz: Array.from(b.rotationHz),
    }),
  );
  const n = Math.round(seconds * fs);
  const timeS = new Float64Array(n);
  const g: [Float64Array, Float64Array, Float64Array] = [
    new Float64Array(n),
    new Float64Array(n),
    new Float64Array(n),
  ];
  const rpm = Array.from({ length: motors }, () => new Float64Array(n));
  const angles = new Array<number>(motors).fill(0);
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    timeS[i] = t;
    const r = Array.from({ length: motors }, (_, m) => rpmOf(m, t, i));
    r.forEach((v, m) => set(rpm[m], i, v));
    set(g[0], i, gyroOf(t, angles));
    for (let m = 0; m < motors; m++)
      angles[m] = (angles[m] ?? 0) + (2 * Math.PI * (r[m] ?? 0)) / 60 / fs;
  }
  tracker.push(n, timeS, g, null, rpm);
  return { blocks, orders };
}

describe("order tracking (computed order tracking; tone power A²/2 of a sine of amplitude A)", () => {
  it("a tone at 2× and one at 2.8× of a motor at 24 000 rpm: exact level at 2×, the non-integer tone found in the order spectrum between", () => {
    // 400 Hz rotation at 4 kHz. Amplitudes 2 and 0.5 deg/s: powers 2 and 0.125 (deg/s)².
    const { blocks, orders } = track(
      4000,
      2.048,
      () => 24000,
      (_t, [a = 0]) => 2 * Math.cos(2 * a + 0.3) + 0.5 * Math.cos(2.8 * a + 1.1),
    );
    const mid = blocks[3];
    if (!mid) throw new Error("no block");
    const at = (q: number) => mid.power[0]?.[orders.indexOf(q)]?.[0] ?? Number.NaN;
    // Tolerance 1 %: the Hann-weighted coherent sum is exact for a tone on the tracked order; the
    // image at −2× and the other tone leak far below that.
    expect(Math.abs(at(2) / 2 - 1)).toBeLessThan(0.01);
    expect(at(1)).toBeLessThan(1e-4);
    // 2.8× lies 0.2 orders from 3×: it is the sideband of 3× (the zoom over two-revolution
    // sub-blocks reaches ±0.25 orders). Expected level: 0.125 times the boxcar response of a
    // two-revolution sub-block 0.2 orders off, sinc²(0.4) (−2.42 dB; sinc(x) = sin πx / πx),
    // within 0.7 dB (the scalloping of a twice zero-padded DFT, under 1 dB at its worst).
    const side3 = mid.side[0]?.[orders.indexOf(3)]?.[0] ?? Number.NaN;
    const sinc = Math.sin(0.4 * Math.PI) / (0.4 * Math.PI);
    expect(Math.abs(10 * Math.log10(side3 / (0.125 * sinc * sinc)))).toBeLessThan(0.7);
    // The exact 3× stays 30 dB below the tone 0.2 orders away
    // (what reaches it is the zoom's sidelobes of that tone); a band 1.3 orders away sees the tone only through the sub-block boxcar's sidelobe,
    // sinc²(2.6) = −18.7 dB (checked below −15 dB).
    expect(at(3)).toBeLessThan(0.125 * 1e-3);
    expect(at(1.5)).toBeLessThan(0.125 * 10 ** (-15 / 10));
  });

  it("two motors 2 % apart: each one's 1× is its own (tone on motor 2 only)", () => {
    const { blocks, orders } = track(
      4000,
      2.048,
      (m) => (m === 0 ? 24000 : 24480),
      (_t, [, b = 0]) => Math.cos(b),
      2,
    );
    const mid = blocks[3];
    const one = orders.indexOf(1);
    const m1 = mid?.power[0]?.[one]?.[0] ?? Number.NaN;
    const m2 = mid?.power[1]?.[one]?.[0] ?? Number.NaN;
    expect(Math.abs(m2 / 0.5 - 1)).toBeLessThan(0.01);
    // 8 Hz apart over a 0.256 s Hann block is about two bins, the edge of the main lobe
    // (±2 bins): under −30 dB.
    expect(m1 / m2).toBeLessThan(1e-3);
  });

  it("masks a block whose telemetry is 0, out of range, stuck or jumping faster than a motor can", () => {
    const fs = 4000;
    const base = (t: number) => 20000 + 3000 * Math.sin(2 * Math.PI * 0.7 * t);
    const cases: [string, (t: number, i: number) => number, MaskReason][] = [
      ["a dropout burst to 0", (t) => (t > 0.3 && t < 0.34 ? 0 : base(t)), "zero"],
      ["150 000 rpm", (t) => (t > 0.3 && t < 0.31 ? 150000 : base(t)), "range"],
      // 1 000 rpm up for one sample: 4e6 rpm/s, twice the 2e6 rpm/s limit
      ["a one-sample glitch", (t, i) => base(t) + (i === 1400 ? 1000 : 0), "slew"],
      ["held at one value", (t) => (t > 0.25 && t < 0.55 ? 21000 : base(t)), "stuck"],
    ];
    for (const [name, bad, reason] of cases) {
      const { blocks } = track(
        fs,
        1.024,
        (m, t, i) => (m === 1 ? bad(t, i) : base(t)),
        (_t, [a = 0]) => Math.cos(a),
        2,
      );
      const masked = blocks.map((b) => b.masked[1]);
      expect(masked, name).toContain(reason);
      // The good motor is never masked, and a masked block has no level.
      expect(
        blocks.every((b) => b.masked[0] === null),
        name,
      ).toBe(true);
      const i = masked.indexOf(reason);
      expect(Number.isNaN(blocks[i]?.power[1]?.[1]?.[0] ?? 0), name).toBe(true);
    }
    // Telemetry held for 8 samples then stepping (ESC telemetry at 500 Hz) is believable.
    const { blocks } = track(
      fs,
      1.024,
      (_m, t, i) => Math.round(base((Math.floor(i / 8) * 8) / fs) / 50) * 50,
      () => 0,
      2,
    );
    expect(blocks.every((b) => b.masked.every((x) => x === null))).toBe(true);
  });
});

describe("OrderTracker: levels of generated tones at known orders", () => {
  const fs = 4000;
  const A = 1.5;
  const expected = (A * A) / 2;

  it("a tone at k× of a steady 18 000 rpm reads at order k with power A²/2 (within 1 %), k = 1…4", () => {
    for (const k of [1, 2, 3, 4]) {
      const { blocks, orders } = track(
        fs,
        2.048,
        () => 18000,
        (_t, [a = 0]) => A * Math.cos(k * a + 0.7),
      );
      // Tolerance 1 %: the Hann-weighted coherent sum is exact for a tone on the tracked order
      // (computed order tracking; A²/2 is the power of a sine of amplitude A); what is left is
      // the image at −k× through the window's sidelobes, far below 1 %.
      for (const b of blocks) {
        const power = b.power[0]?.[orders.indexOf(k)]?.[0] ?? Number.NaN;
        expect(Math.abs(power / expected - 1), `order ${k}`).toBeLessThan(0.01);
      }
    }
  });

  it("the tone stays at order k while the rpm ramps 15 000 → 21 000 within the log (within 1 %)", () => {
    // The demodulation follows the integrated angle, so a tone locked to the rotation keeps its
    // order however the rpm moves (a fixed FFT bin would smear it over 100 Hz here).
    const { blocks, orders } = track(
      fs,
      2.048,
      (_m, t) => 15000 + (6000 * t) / 2.048,
      (_t, [a = 0]) => A * Math.cos(3 * a),
    );
    expect(blocks.length).toBe(8);
    for (const b of blocks) {
      const power = b.power[0]?.[orders.indexOf(3)]?.[0] ?? Number.NaN;
      expect(Math.abs(power / expected - 1)).toBeLessThan(0.01);
      // 1× and 2× carry nothing: under −40 dB of the tone.
      expect(b.power[0]?.[orders.indexOf(1)]?.[0] ?? 1).toBeLessThan(expected * 1e-4);
      expect(b.power[0]?.[orders.indexOf(2)]?.[0] ?? 1).toBeLessThan(expected * 1e-4);
    }
  });

  it("an order whose frequency lies outside the trusted range is not measured; the others are", () => {
    // 1 800 rpm is 30 Hz: 0.5× (15 Hz) and 1× (30 Hz) lie below the 40 Hz floor of track(),
    // 2× (60 Hz) and above are measured.
    const { blocks, orders } = track(
      fs,
      1.024,
      () => 1800,
      (_t, [a = 0]) => A * Math.cos(2 * a),
    );
    const mid = blocks[2];
    if (!mid) throw new Error("no block");
    expect(mid.masked[0]).toBeNull();
    expect(mid.power[0]?.[orders.indexOf(0.5)]?.[0]).toBeNaN();
    expect(mid.power[0]?.[orders.indexOf(1)]?.[0]).toBeNaN();
    expect(Number.isFinite(mid.power[0]?.[orders.indexOf(2)]?.[0])).toBe(true);
    expect(mid.rotationHz[0]).toBeCloseTo(30, 9);
  });
});

describe("orders above the Nyquist frequency, where they fold (sampling theorem; see folding.test.ts)", () => {
  it("a 2× tone above a 1 kHz log's Nyquist frequency reads its true level where it folds; the blade pass there is not measured", () => {
    // 18 600 rpm: 310 Hz rotation; 2× at 620 Hz folds to 380 Hz in a 1 kHz log, 70 Hz clear of
    // 1× (the tracker asks for two Hann main-lobe half-widths of a 0.256 s block, 2·2/0.256 =
    // 15.6 Hz). Amplitude 2 deg/s: power 2 (deg/s)². A 1× of amplitude 1 and a blade pass (3×,
    // 930 Hz, folding to 70 Hz) of amplitude 1 are in the same samples.
    const { blocks, orders } = track(
      1000,
      2.048,
      () => 18600,
      (_t, [a = 0]) => Math.cos(a + 0.2) + 2 * Math.cos(2 * a + 0.3) + Math.cos(3 * a + 0.9),
    );
    const mid = blocks[3];
    if (!mid) throw new Error("no block");
    const at = (q: number) => mid.power[0]?.[orders.indexOf(q)]?.[0] ?? Number.NaN;
    // 1 %, as for a direct tone: demodulating the samples at 2× the angle is coherent with them
    // whatever frequency they show at.
    expect(Math.abs(at(2) / 2 - 1)).toBeLessThan(0.01);
    expect(Math.abs(at(1) / 0.5 - 1)).toBeLessThan(0.01);
    // Folded, only 1× and 2× are followed: the blade pass is not measured (NaN), nor the half
    // orders above fs/2.
    expect(at(3)).toBeNaN();
    expect(at(2.5)).toBeNaN();
  });

  it("a folded order too near another order of its motor is not measured", () => {
    // 20 100 rpm: 335 Hz; 2× at 670 Hz folds to 330 Hz, 5 Hz from 1× (under 15.6 Hz).
    const { blocks, orders } = track(
      1000,
      2.048,
      () => 20100,
      (_t, [a = 0]) => Math.cos(a) + Math.cos(2 * a),
    );
    const mid = blocks[3];
    expect(mid?.power[0]?.[orders.indexOf(2)]?.[0]).toBeNaN();
    expect(mid?.power[0]?.[orders.indexOf(1)]?.[0]).toBeGreaterThan(0);
  });
});
