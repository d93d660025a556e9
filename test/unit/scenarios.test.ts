import { beforeAll, describe, expect, it } from "vitest";
import { analyzeDemoLog } from "@/lib/demo/analyze-demo";
import { generateLog, SCENARIOS, type DemoLogOptions, type Scenario } from "@/lib/demo/generator";
import { buildBaseline, type Baseline } from "@/lib/health/baseline";
import { compareWithBaseline, type Assessment, type FindingKind } from "@/lib/health/compare";

// The generator's scenarios are invented (lib/demo); what is checked here is that the score
// behaves as the thresholds promise on them: healthy ≥ 80 and ok, harder flying still ok, damage
// at three severities strictly worse, the worst at inspect or ground, and a finding of the right
// kind on the right axis within 5 % of the right frequency.
const DURATION_S = 40;
let baseline: Baseline;

function assess(options: Omit<DemoLogOptions, "durationS">): Assessment {
  return compareWithBaseline(
    analyzeDemoLog({ durationS: DURATION_S, ...options }).analysis,
    baseline,
  );
}

beforeAll(() => {
  baseline = buildBaseline([
    analyzeDemoLog({ seed: 101, durationS: DURATION_S }).analysis,
    analyzeDemoLog({ seed: 102, durationS: DURATION_S }).analysis,
  ]);
});

describe("baseline of the demo frame", () => {
  it("holds the frame's three structural modes per axis", () => {
    // Modes of the invented house frame (lib/demo/airframe-model.ts): 174, 236, 312 Hz ± 2 %.
    const byAxis = Object.fromEntries(baseline.modes.map((m) => [m.axis, m.freqHz]));
    expect(byAxis.roll).toBeGreaterThan(174 * 0.97);
    expect(byAxis.roll).toBeLessThan(174 * 1.03);
    expect(byAxis.pitch).toBeGreaterThan(236 * 0.97);
    expect(byAxis.pitch).toBeLessThan(236 * 1.03);
    expect(byAxis.yaw).toBeGreaterThan(312 * 0.97);
    expect(byAxis.yaw).toBeLessThan(312 * 1.03);
  });
});

describe("healthy flying does not read as damage", () => {
  it("a healthy repeat scores ≥ 80 and ok", () => {
    for (const seed of [7, 8]) {
      const a = assess({ seed });
      expect(a.score).toBeGreaterThanOrEqual(80);
      expect(a.status).toBe("ok");
    }
  });
  it("the same airframe flown harder stays ok", () => {
    const a = assess({ seed: 9, style: "hard" });
    expect(a.status).toBe("ok");
    expect(a.score).toBeGreaterThanOrEqual(80);
  });
  it("logs at 1, 2 and 8 kHz compare over the common range and stay ok", () => {
    for (const sampleRateHz of [1000, 2000, 8000]) {
      const a = assess({ seed: 5, sampleRateHz });
      expect(a.status).toBe("ok");
      if (sampleRateHz < 4000)
        expect(a.notCompared.some((n) => n.reason.includes(`recorded at ${sampleRateHz} Hz`))).toBe(
          true,
        );
    }
  });
});

const EXPECTED: Record<Exclude<Scenario, "healthy">, FindingKind[]> = {
  "cracked-arm": ["mode-shift"],
  "bent-prop": ["motor-order"],
  "worn-bearing": ["floor-rise", "band-rise"],
  "loose-stack": ["new-peak"],
};

describe.each(SCENARIOS.filter((s) => s !== "healthy"))("%s at three severities", (scenario) => {
  const results: { assessment: Assessment; options: DemoLogOptions }[] = [];
  beforeAll(() => {
    for (const severity of [1, 2, 3] as const) {
      const options = { seed: 20 + severity, scenario, severity };
      results.push({ assessment: assess(options), options });
    }
  });

  it("scores fall strictly with severity, the worst at inspect or ground", () => {
    const scores = results.map((r) => r.assessment.score);
    expect(scores[0]).toBeLessThan(100);
    expect(scores[1]).toBeLessThan(scores[0] ?? 0);
    expect(scores[2]).toBeLessThan(scores[1] ?? 0);
    expect(["inspect", "ground"]).toContain(results[2]?.assessment.status);
  });

  it("names the right kind, axis and frequency", () => {
    for (const { assessment, options } of results) {
      const log = generateLog({ ...options, durationS: 4 });
      const truth = log.truth;
      const finding = assessment.findings.find((f) => EXPECTED[scenario].includes(f.kind));
      expect(finding, JSON.stringify(assessment.findings)).toBeDefined();
      if (!finding) continue;
      if (truth.axis) expect(finding.axis).toBe(truth.axis);
      if (truth.freqHz) expect(Math.abs(finding.freqHz / truth.freqHz - 1)).toBeLessThan(0.05);
      if (truth.band) {
        expect(finding.freqHz).toBeGreaterThanOrEqual(truth.band.loHz);
        expect(finding.freqHz).toBeLessThanOrEqual(truth.band.hiHz);
      }
      if (truth.motor && finding.kind === "motor-order") {
        expect(finding.motor).toBe(truth.motor);
        // The motor's own rotation rate from its rpm column, over the whole demo log.
        const full = generateLog({ ...options, durationS: DURATION_S });
        const i = full.motors.indexOf(truth.motor);
        const rpm = full.rpm[i] ?? new Float64Array(1);
        const meanHz = rpm.reduce((s, v) => s + v, 0) / rpm.length / 60;
        expect(Math.abs(finding.freqHz / meanHz - 1)).toBeLessThan(0.05);
      }
      expect(finding.text.length).toBeGreaterThan(40);
    }
  });
});
