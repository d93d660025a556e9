import { describe, expect, it } from "vitest";
import { analyzeDemoLog } from "@/lib/demo/analyze-demo";
import { OrderTracker, type MaskReason } from "@/lib/analysis/order-tracker";
import { TELEMETRY_LIMITS, trackedOrders } from "@/lib/analysis/settings";
import { buildBaseline } from "@/lib/health/baseline";
import { compareWithBaseline } from "@/lib/health/compare";
import { analyzeWith } from "../support/demo-feed";

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

describe("untrustworthy rpm is not vibration (issue 8 item 2)", () => {
  const DURATION_S = 30;
  const baseline = () =>
    buildBaseline([
      analyzeDemoLog({ seed: 101, durationS: DURATION_S }).analysis,
      analyzeDemoLog({ seed: 102, durationS: DURATION_S }).analysis,
    ]);

  it("a healthy airframe whose motor 2 telemetry drops to 0 in bursts stays ok, the masked share reported", () => {
    // Generated case: 40 ms of 0 every 0.6 s on motor 2 (about 1 block in 2 touched).
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      for (let i = 0; i < b.n; i++)
        if ((b.start + i) % Math.round(0.6 * b.sampleRateHz) < 0.04 * b.sampleRateHz)
          set(b.rpm[1], i, 0);
    });
    const m2 = a.motors.find((m) => m.motor === 2);
    expect(m2?.maskedBlocks?.zero).toBeGreaterThan(10);
    expect(m2?.maskedShare).toBeGreaterThan(0.2);
    const r = compareWithBaseline(a, baseline());
    expect(r.findings.filter((f) => f.kind === "motor-order")).toEqual([]);
    expect(r.status).toBe("ok");
  });

  it("a motor masked in most of the log is listed as not compared", () => {
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      for (let i = 0; i < b.n; i++) if ((b.start + i) % 1000 < 20) set(b.rpm[2], i, 0);
    });
    const r = compareWithBaseline(a, baseline());
    expect(r.notCompared.find((n) => n.what === "motor 3 orders")?.reason).toMatch(
      /could not be believed in \d+ % of the log \(reads 0\)/,
    );
    expect(r.findings.some((f) => f.motor === 3)).toBe(false);
  });
});
