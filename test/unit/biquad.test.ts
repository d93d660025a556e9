import { describe, expect, it } from "vitest";
import { Biquad } from "@/lib/signal/biquad";

/** Steady-state gain of `f` at `hz`: a sine run for `seconds`, then projected over the last whole second. */
function gainAt(f: Biquad, hz: number, fs: number, seconds = 20): number {
  const n = Math.round(seconds * fs);
  let re = 0;
  let im = 0;
  for (let i = 0; i < n; i++) {
    const phase = (2 * Math.PI * hz * i) / fs;
    const y = f.step(Math.sin(phase));
    if (i >= n - fs) {
      re += y * Math.sin(phase);
      im += y * Math.cos(phase);
    }
  }
  return (2 * Math.hypot(re, im)) / fs;
}

describe("Biquad.highPass (R. Bristow-Johnson, Audio EQ Cookbook)", () => {
  it("has gain Q at its corner: 1/√2 (−3.01 dB) for the Butterworth section", () => {
    // The cookbook's low- and high-pass have |H| = Q at ω0. Tolerance 1e-4: the projection over
    // one whole second of a 20 s run.
    expect(
      Math.abs(gainAt(Biquad.highPass(10, Math.SQRT1_2, 4000), 10, 4000) - Math.SQRT1_2),
    ).toBeLessThan(1e-4);
  });

  it("follows the analogue Butterworth |H|² = r⁴/(1 + r⁴) away from the corner", () => {
    // r = f/fc. At fs = 8 kHz and fc = 10 Hz the bilinear transform's warping is below 1e-5
    // relative; tolerance 1e-3 relative.
    for (const hz of [2.5, 5, 40, 200]) {
      const r = hz / 10;
      const expected = Math.sqrt(r ** 4 / (1 + r ** 4));
      const g = gainAt(Biquad.highPass(10, Math.SQRT1_2, 8000), hz, 8000);
      expect(Math.abs(g / expected - 1)).toBeLessThan(1e-3);
    }
  });

  it("settle: a constant input after settling gives 0, with no start-up transient", () => {
    const f = Biquad.highPass(10, Math.SQRT1_2, 4000);
    f.settle(500);
    let worst = 0;
    for (let i = 0; i < 4000; i++) worst = Math.max(worst, Math.abs(f.step(500)));
    // Exact up to rounding (the high-pass's numerator sums to zero).
    expect(worst).toBeLessThan(1e-9);
    // Unsettled, the same constant rings at its full size first.
    const cold = Biquad.highPass(10, Math.SQRT1_2, 4000);
    expect(Math.abs(cold.step(500))).toBeGreaterThan(400);
  });
});
