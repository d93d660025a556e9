import { describe, expect, it } from "vitest";
import { DEFAULT_THRESHOLDS, penaltyFor, scoreForPoints } from "@/lib/health/thresholds";
import { scoreText } from "@/lib/view/score-text";

// The score's scale is our own design (lib/health/thresholds.ts); these checks pin the properties
// the queue relies on: a worse finding always costs more and a worse airframe always scores lower,
// down to the worst, with the documented steps unchanged where they were.
describe("the score scale", () => {
  const t = DEFAULT_THRESHOLDS.levelDb;

  it("keeps the documented points at watch, inspect and ground", () => {
    expect(penaltyFor(t.watch, t)).toBe(10);
    expect(penaltyFor(t.inspect, t)).toBe(25);
    expect(penaltyFor(t.ground, t)).toBe(50);
    expect(penaltyFor(t.watch - 0.01, t)).toBe(0);
  });

  it("keeps rising past ground, at the old 25 points per ground step at first, never reaching 75", () => {
    // Just above ground the slope is the old linear one (25 points per 12 dB): tolerance 0.1 point
    // (the points are rounded to 0.1).
    expect(penaltyFor(t.ground + 1.2, t)).toBeCloseTo(52.5, 0);
    const magnitudes = [12, 18, 24, 36, 48, 60];
    const points = magnitudes.map((m) => penaltyFor(m, t));
    for (let i = 1; i < points.length; i++)
      expect(points[i] ?? 0).toBeGreaterThan(points[i - 1] ?? 0);
    expect(Math.max(...points)).toBeLessThan(DEFAULT_THRESHOLDS.maxPenalty);
  });

  it("is 100 minus the points down to 10, then falls ever more slowly without reaching 0", () => {
    expect(scoreForPoints(0)).toBe(100);
    expect(scoreForPoints(41)).toBe(59);
    expect(scoreForPoints(90)).toBe(10);
    // Continuous at the joint, same slope: 1 point more costs about 1 point of score there.
    expect(scoreForPoints(91)).toBeCloseTo(9.1, 1);
    const totals = [95, 100, 110, 125, 150, 200, 300, 400, 480, 800, 1500];
    const scores = totals.map(scoreForPoints);
    for (let i = 1; i < scores.length; i++) expect(scores[i] ?? 0).toBeLessThan(scores[i - 1] ?? 0);
    expect(Math.min(...scores)).toBeGreaterThan(0);
  });

  it("is shown whole above 10 and with one decimal below", () => {
    expect(scoreText(73)).toBe("73");
    expect(scoreText(4.2)).toBe("4.2");
    expect(scoreText(0.734)).toBe("0.73");
    expect(scoreText(null)).toBe("–");
    expect(scoreText(Number.NaN)).toBe("–");
  });
});
