import { describe, expect, it } from "vitest";
import {
  linearRgbToOklab,
  linearToSrgb,
  oklabToLinearRgb,
  rampColour,
  rampLinear,
  srgbToLinear,
  type Rgb,
} from "@/lib/view/colour-ramp";

// Colour-vision simulation: G. M. Machado, M. M. Oliveira, L. A. F. Fernandes, "A physiologically-
// based model for simulation of color vision deficiency", IEEE TVCG 15(6), 2009 — the severity-1.0
// matrices for protanopia, deuteranopia and tritanopia, applied to linear RGB. The coefficients
// are quoted from memory of the paper's supplementary table (to 6 digits).
const SIMULATIONS: Record<string, readonly (readonly [number, number, number])[]> = {
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
  // Achromatopsia as luminance alone (Rec. 709 / sRGB luminance weights, IEC 61966-2-1).
  greyscale: [
    [0.2126, 0.7152, 0.0722],
    [0.2126, 0.7152, 0.0722],
    [0.2126, 0.7152, 0.0722],
  ],
};

function simulate(m: readonly (readonly [number, number, number])[], [r, g, b]: Rgb): Rgb {
  const row = (i: number) => {
    const k = m[i] ?? [0, 0, 0];
    return Math.min(1, Math.max(0, k[0] * r + k[1] * g + k[2] * b));
  };
  return [row(0), row(1), row(2)];
}

const dist = (a: readonly number[], b: readonly number[]) =>
  Math.hypot(...a.map((v, i) => v - (b[i] ?? 0)));

describe("OKLab conversion (Ottosson 2020)", () => {
  it("white is L = 1, a = b = 0 and black is L = 0 (tolerance 1e-4, the article's matrices are rounded)", () => {
    const [L, a, b] = linearRgbToOklab([1, 1, 1]);
    expect(L).toBeCloseTo(1, 4);
    expect(Math.abs(a)).toBeLessThan(1e-4);
    expect(Math.abs(b)).toBeLessThan(1e-4);
    expect(linearRgbToOklab([0, 0, 0])[0]).toBe(0);
  });
  it("round-trips linear sRGB to 2e-5 (the published forward and inverse matrices are each rounded to 10 digits)", () => {
    for (const c of [
      [0.2, 0.5, 0.9],
      [1, 0, 0],
      [0.01, 0.9, 0.3],
    ] as const) {
      expect(dist(oklabToLinearRgb(linearRgbToOklab(c)), c)).toBeLessThan(2e-5);
    }
  });
  it("the sRGB transfer function is inverted by its own inverse (IEC 61966-2-1), to 1e-7", () => {
    // Not exact at the knee: the standard's thresholds 0.04045 and 0.0031308 meet only to ~3e-8.
    for (const v of [0, 0.002, 0.04045, 0.5, 1])
      expect(Math.abs(linearToSrgb(srgbToLinear(v)) - v)).toBeLessThan(1e-7);
  });
});

describe("the level ramp", () => {
  const steps = Array.from({ length: 9 }, (_, i) => rampLinear(i / 8));

  it("stays inside sRGB and gives a CSS colour", () => {
    for (const c of steps) for (const v of c) expect(v >= 0 && v <= 1).toBe(true);
    expect(rampColour(0.5)).toMatch(/^rgb\(\d+,\d+,\d+\)$/);
  });

  for (const [name, m] of Object.entries(SIMULATIONS)) {
    it(`keeps its order and its steps apart as seen with ${name}`, () => {
      const seen = steps.map((c) => linearRgbToOklab(simulate(m, c)));
      for (let i = 1; i < seen.length; i++) {
        // Lightness rises at every step, and neighbouring steps differ by at least 0.04 in OKLab
        // (about four just-noticeable differences; Ottosson puts a JND near 0.01 — from memory).
        expect((seen[i]?.[0] ?? 0) - (seen[i - 1]?.[0] ?? 0)).toBeGreaterThan(0.02);
        expect(dist(seen[i] ?? [], seen[i - 1] ?? [])).toBeGreaterThan(0.04);
      }
    });
  }
});
