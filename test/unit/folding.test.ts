import { describe, expect, it } from "vitest";
import { foldedHz, foldsWhole } from "@/lib/signal/folding";

describe("where a tone shows once sampled (sampling theorem; Oppenheim & Schafer, Discrete-Time Signal Processing, §4.2)", () => {
  it("folds a tone into 0..fs/2: f, fs − f, f − fs … (textbook aliasing)", () => {
    // Worked by hand: 700 Hz sampled at 1 kHz shows at 1000 − 700 = 300 Hz; 1300 Hz at 300 Hz;
    // 1600 Hz at 400 Hz; 2100 Hz at 100 Hz; a tone below fs/2 stays put; fs/2 is its own fold.
    expect(foldedHz(700, 1000)).toBe(300);
    expect(foldedHz(1300, 1000)).toBe(300);
    expect(foldedHz(1600, 1000)).toBe(400);
    expect(foldedHz(2100, 1000)).toBe(100);
    expect(foldedHz(320, 1000)).toBe(320);
    expect(foldedHz(500, 1000)).toBe(500);
  });

  it("the samples of a tone above fs/2 are those of its fold (sin(2π·700·n/1000) = −sin(2π·300·n/1000))", () => {
    for (let n = 0; n < 200; n++) {
      const high = Math.sin((2 * Math.PI * 700 * n) / 1000);
      const folded = -Math.sin((2 * Math.PI * 300 * n) / 1000);
      // 1e-9: rounding of the arguments only.
      expect(Math.abs(high - folded)).toBeLessThan(1e-9);
    }
  });

  it("a range folds whole only between two multiples of fs/2", () => {
    expect(foldsWhole(600, 700, 1000)).toBe(true);
    expect(foldsWhole(480, 520, 1000)).toBe(false);
    expect(foldsWhole(990, 1010, 1000)).toBe(false);
  });
});
