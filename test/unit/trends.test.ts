import { describe, expect, it } from "vitest";
import { analyzeDemoLog } from "@/lib/demo/analyze-demo";
import { buildBaseline } from "@/lib/health/baseline";
import { modeKey, trendPoint } from "@/lib/health/trends";

// The trend point of a log against its baseline. The logs are the demo generator's invented frame;
// its cracked-arm scenario lowers the pitch bending mode by a known fraction (the scenario's own
// truth), which the trend must show within 2 % of the baseline frequency (about one 2 Hz bin at
// 236 Hz plus the peak-picking jitter of a 24 s log).
const baseline = buildBaseline([
  analyzeDemoLog({ seed: 61, durationS: 24 }).analysis,
  analyzeDemoLog({ seed: 62, durationS: 24 }).analysis,
]);

describe("trend points", () => {
  it("a healthy repeat sits near zero on the frame's modes and band lines", () => {
    const p = trendPoint(analyzeDemoLog({ seed: 63, durationS: 24 }).analysis, baseline);
    // The invented frame's three structural modes (lib/demo/airframe-model.ts: 174, 236, 312 Hz).
    const frameModes = baseline.modes.filter((m) => m.freqHz < 400);
    expect(frameModes).toHaveLength(3);
    for (const m of frameModes) expect(Math.abs(p.modeShiftPct[modeKey(m)] ?? 99)).toBeLessThan(2);
    for (const v of Object.values(p.bandRiseDb)) expect(v ?? 99).toBeLessThan(3);
  });

  it("a cracked arm shows as the pitch mode's drop, by the scenario's own amount", () => {
    const { analysis, truth } = analyzeDemoLog({
      seed: 64,
      durationS: 24,
      scenario: "cracked-arm",
      severity: 3,
    });
    const p = trendPoint(analysis, baseline);
    const pitch = baseline.modes.find((m) => m.axis === "pitch");
    if (!pitch || truth.freqHz === undefined) throw new Error("no pitch mode");
    const expected = ((truth.freqHz - pitch.freqHz) / pitch.freqHz) * 100;
    expect(p.modeShiftPct[modeKey(pitch)] ?? 0).toBeCloseTo(expected, -0.5);
    expect(Math.abs((p.modeShiftPct[modeKey(pitch)] ?? 0) - expected)).toBeLessThan(2);
  });
});
