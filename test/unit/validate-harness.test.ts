import { beforeAll, describe, expect, it } from "vitest";
import type { Assessment, Finding } from "@/lib/health/compare";
import type { CaseTruth } from "@/lib/demo/fc-sim/damage";
import { diagnose } from "@/lib/demo/validation/classify";
import {
  CaseRunner,
  formatSummary,
  fullyRight,
  judge,
  matrixJobs,
  summarise,
  type CaseResult,
  type MatrixOptions,
} from "@/lib/demo/validation/matrix";

// Checks that the validation harness itself works: cases are built as stated, every log is read
// and compared, the truth travels with each result, and the judge and the tables count what they
// say. Whether the engine passes the matrix is not asserted here. The assessments built by hand
// below are generated test cases for the judge, not engine output.

const SMALL: MatrixOptions = {
  airframes: [1],
  rates: [2000],
  classes: ["crack", "bent-prop"],
  severities: [1, 2, 3],
  healthy: ["repeat", "dropout", "other-rate", "foreign-header"],
  durationS: 16,
};

function finding(f: Partial<Finding> & Pick<Finding, "kind" | "axis" | "freqHz">): Finding {
  return { severity: "inspect", points: 30, text: "", ...f };
}

function assessment(
  findings: Finding[],
  status: Assessment["status"] = "inspect",
  score = 70,
): Assessment {
  return { score, status, findings, notCompared: [], comparedBands: [] };
}

describe("the matrix's cases", () => {
  it("fly the three severities of a class as one flight with the damage in one place", () => {
    const jobs = matrixJobs(SMALL);
    const crack = jobs.filter((j) => j.variant === "crack");
    expect(crack.map((j) => j.severity)).toEqual([1, 2, 3]);
    expect(new Set(crack.map((j) => j.flight.seed)).size).toBe(1);
    expect(new Set(crack.map((j) => j.damage?.seed)).size).toBe(1);
    // A test flight flies another mix than the baseline flights.
    for (const j of jobs.filter((x) => x.group === "damage"))
      expect(j.flight.mix).not.toBe("baseline");
  });

  it("make the other-rate variant log at another rate than its baseline, and the foreign one use another header", () => {
    const jobs = matrixJobs(SMALL);
    const other = jobs.find((j) => j.variant === "other-rate");
    expect(other?.pairs[0]?.testRate).not.toBe(other?.pairs[0]?.baselineRate);
    const repeat = jobs.find((j) => j.id === "af1/healthy/repeat");
    const foreign = jobs.find((j) => j.variant === "foreign-header");
    expect(foreign?.style).not.toBe(repeat?.style);
    expect(foreign?.flight.seed).toBe(repeat?.flight.seed);
  });

  it("do not depend on which classes are selected", () => {
    const a = matrixJobs(SMALL).find((j) => j.id === "af1/bent-prop/s2");
    const b = matrixJobs({ ...SMALL, classes: ["bent-prop"] }).find(
      (j) => j.id === "af1/bent-prop/s2",
    );
    expect(b).toEqual(a);
  });
});

describe("a small matrix run end to end (bounded: 1 airframe, 2 kHz, 16 s flights)", () => {
  const results: CaseResult[] = [];
  beforeAll(async () => {
    const runner = new CaseRunner(SMALL);
    for (const job of matrixJobs(SMALL)) results.push(...(await runner.run(job)));
  });

  it("reads, analyses and compares every log, with the truth of its case", () => {
    // repeat (two flights), dropout, other-rate, foreign-header; two classes at three severities.
    expect(results.length).toBe(5 + 2 * 3);
    for (const r of results) {
      expect(r.error).toBeUndefined();
      expect(["ok", "watch", "inspect", "ground"]).toContain(r.verdict.status);
      expect(r.truth.kind).toBe(r.group === "healthy" ? "healthy" : r.variant);
      expect(r.truth.severity).toBe(r.severity);
    }
    const other = results.find((r) => r.variant === "other-rate");
    expect(other?.testRate).toBe(1000);
    expect(other?.baselineRate).toBe(2000);
  });

  it("summarises into tables that add up", () => {
    const s = summarise(results, SMALL);
    expect(s.cases).toBe(results.length);
    for (const h of s.healthy)
      expect(h.statuses.ok + h.statuses.watch + h.statuses.inspect + h.statuses.ground).toBe(h.n);
    for (const d of s.damage) expect(d.n).toBe(1);
    expect(s.monotone.map((m) => m.groups)).toEqual([1, 1]);
    const text = formatSummary(s, SMALL);
    expect(text).toContain("done when:");
    expect(text).toContain("crack");
  });
});

describe("the judge", () => {
  const crack: CaseTruth = {
    kind: "crack",
    severity: 3,
    description: "",
    axes: ["pitch"],
    freqsHz: [200],
  };
  const prop: CaseTruth = {
    kind: "bent-prop",
    severity: 3,
    description: "",
    axes: [],
    freqsHz: [],
    motor: 3,
  };
  const healthy: CaseTruth = {
    kind: "healthy",
    severity: 0,
    description: "",
    axes: [],
    freqsHz: [],
  };

  it("calls inspect or ground on a healthy log a false alarm, watch not", () => {
    expect(judge(healthy, assessment([], "inspect")).falseAlarm).toBe(true);
    expect(judge(healthy, assessment([], "ground")).falseAlarm).toBe(true);
    expect(judge(healthy, assessment([], "watch")).falseAlarm).toBe(false);
  });

  it("holds class, axis, frequency (±5 %) and motor against the truth", () => {
    const right = judge(
      crack,
      assessment([
        finding({
          kind: "mode-shift",
          axis: "pitch",
          freqHz: 204,
          shiftPct: -9,
          baselineFreqHz: 224,
        }),
      ]),
    );
    expect(fullyRight(right)).toBe(true);
    const offFreq = judge(
      crack,
      assessment([
        finding({
          kind: "mode-shift",
          axis: "pitch",
          freqHz: 211,
          shiftPct: -6,
          baselineFreqHz: 224,
        }),
      ]),
    );
    expect(offFreq.freqRight).toBe(false);
    const offAxis = judge(
      crack,
      assessment([
        finding({
          kind: "mode-shift",
          axis: "roll",
          freqHz: 200,
          shiftPct: -9,
          baselineFreqHz: 220,
        }),
      ]),
    );
    expect(offAxis.axisRight).toBe(false);
    const wrongMotor = judge(
      prop,
      assessment([finding({ kind: "motor-order", axis: "roll", freqHz: 300, motor: 2 })]),
    );
    expect(wrongMotor.classRight).toBe(true);
    expect(wrongMotor.motorRight).toBe(false);
    const missed = judge(prop, assessment([], "ok", 100));
    expect(missed.miss).toBe(true);
    expect(fullyRight(missed)).toBe(false);
  });

  it("takes the class from the finding with most points", () => {
    const v = judge(
      crack,
      assessment([
        finding({ kind: "new-peak", axis: "pitch", freqHz: 200, points: 40 }),
        finding({
          kind: "mode-shift",
          axis: "pitch",
          freqHz: 200,
          shiftPct: -10,
          baselineFreqHz: 222,
          points: 20,
        }),
      ]),
    );
    expect(v.classRight).toBe(false);
    expect(v.freqRight).toBe(true);
  });

  it("reads two modes dropping together as loose frame screws, one as a crack", () => {
    const one = diagnose(
      assessment([
        finding({
          kind: "mode-shift",
          axis: "pitch",
          freqHz: 200,
          shiftPct: -10,
          baselineFreqHz: 222,
        }),
      ]),
    );
    expect(one[0]?.classes).toEqual(["crack"]);
    const two = diagnose(
      assessment([
        finding({
          kind: "mode-shift",
          axis: "pitch",
          freqHz: 200,
          shiftPct: -10,
          baselineFreqHz: 222,
        }),
        finding({
          kind: "mode-shift",
          axis: "roll",
          freqHz: 155,
          shiftPct: -8,
          baselineFreqHz: 168,
        }),
      ]),
    );
    expect(two.every((d) => d.classes.includes("loose-frame"))).toBe(true);
  });

  it("counts scores strictly falling with severity, and not when two are equal", () => {
    const base = results3([90, 70, 40]);
    expect(summarise(base, { ...SMALL, classes: ["crack"] }).monotone[0]?.strictlyFalling).toBe(1);
    const flat = results3([90, 70, 70]);
    expect(summarise(flat, { ...SMALL, classes: ["crack"] }).monotone[0]?.strictlyFalling).toBe(0);
  });
});

function results3(scores: number[]): CaseResult[] {
  return scores.map((score, i) => ({
    id: `af1/crack/s${i + 1}`,
    airframe: 1,
    group: "damage",
    variant: "crack",
    severity: (i + 1) as 1 | 2 | 3,
    testRate: 2000,
    baselineRate: 2000,
    style: "canonical",
    truth: {
      kind: "crack",
      severity: (i + 1) as 1 | 2 | 3,
      description: "",
      axes: ["pitch"],
      freqsHz: [200],
    },
    verdict: {
      status: "inspect",
      score,
      miss: false,
      falseAlarm: false,
      classRight: true,
      axisRight: true,
      freqRight: true,
      motorRight: null,
    },
    findings: [],
  }));
}
