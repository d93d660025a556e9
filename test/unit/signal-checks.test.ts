import { beforeAll, describe, expect, it } from "vitest";
import { analyzeDemoLog } from "@/lib/demo/analyze-demo";
import { buildBaseline, type Baseline } from "@/lib/health/baseline";
import { compareWithBaseline } from "@/lib/health/compare";
import { rankQueue, type AirframeFacts } from "@/lib/health/queue-rank";
import { AXES } from "@/lib/logs/columns";
import { analyzeWith } from "../support/demo-feed";

// Issue 11, defect 1: an axis with no usable signal (flat, constant, clipped, out of any gyro's
// range) is not compared and says so; a log with no comparable axis has no score and is never ok.
// The cases are generated (demo logs with one channel broken on purpose); the limits are the
// ones of lib/analysis/settings.ts SIGNAL_CHECKS.
const DURATION_S = 30;
let baseline: Baseline;

beforeAll(() => {
  baseline = buildBaseline([
    analyzeDemoLog({ seed: 101, durationS: DURATION_S }).analysis,
    analyzeDemoLog({ seed: 102, durationS: DURATION_S }).analysis,
  ]);
});

describe("signal checks per axis", () => {
  it("healthy demo logs, also quantised like a 16-bit ±2000 deg/s gyro, pass every check", () => {
    // 16.4 LSB per deg/s: a common MEMS gyro setting (from memory).
    const lsb = 1 / 16.4;
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      for (const g of b.gyro)
        for (let i = 0; i < b.n; i++) g[i] = Math.round((g[i] ?? 0) / lsb) * lsb;
    });
    for (const axis of AXES) {
      expect(a.axes[axis].signal?.usable).toBe(true);
      expect(a.axes[axis].signal?.clippedShare).toBeLessThan(0.001);
    }
  });

  it("all zeros, a constant 1000 deg/s and ±1e200 are each named and not compared", () => {
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      b.gyro[0].fill(0, 0, b.n);
      b.gyro[1].fill(1000, 0, b.n);
      for (let i = 0; i < b.n; i++) b.gyro[2][i] = i % 2 === 0 ? 1e200 : -1e200;
    });
    expect(a.axes.roll.signal).toMatchObject({ usable: false, problem: "constant" });
    expect(a.axes.pitch.signal).toMatchObject({ usable: false, problem: "constant" });
    expect(a.axes.yaw.signal).toMatchObject({ usable: false, problem: "out-of-range" });
    // Nothing non-finite leaves the analyser: JSON would turn it into null silently.
    for (const axis of AXES) expect(a.axes[axis].psd.every(Number.isFinite)).toBe(true);
    const r = compareWithBaseline(a, baseline);
    expect(Number.isNaN(r.score)).toBe(true);
    expect(r.status).not.toBe("ok");
    expect(r.findings).toEqual([]);
    for (const axis of AXES)
      expect(r.notCompared.some((n) => n.what === `${axis} axis`)).toBe(true);
    expect(r.notCompared.some((n) => n.what === "whole log" && /unusable/.test(n.reason))).toBe(
      true,
    );
  });

  it("one ±1e308 cell takes out only its axis; the others are still compared", () => {
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      if (b.start === 0) b.gyro[1][100] = 1e308;
    });
    expect(a.axes.pitch.signal).toMatchObject({ usable: false, problem: "out-of-range" });
    expect(a.axes.roll.signal?.usable).toBe(true);
    const r = compareWithBaseline(a, baseline);
    expect(Number.isFinite(r.score)).toBe(true);
    expect(r.notCompared.find((n) => n.what === "pitch axis")?.reason).toMatch(
      /beyond any rate gyro's range/,
    );
  });

  it("a flat axis (noise below one gyro step) and a clipped axis are not compared", () => {
    const a = analyzeWith({ seed: 7, durationS: DURATION_S }, (b) => {
      for (let i = 0; i < b.n; i++) {
        b.gyro[0][i] = 3 + 0.001 * Math.sin(i);
        // Saturation at ±40 deg/s: the demo's vibration exceeds it often (several % of samples).
        b.gyro[1][i] = Math.max(-40, Math.min(40, 4 * (b.gyro[1][i] ?? 0)));
      }
    });
    expect(a.axes.roll.signal).toMatchObject({ usable: false, problem: "flat" });
    expect(a.axes.pitch.signal).toMatchObject({ usable: false, problem: "clipped" });
    expect(a.axes.pitch.signal?.clippedShare).toBeGreaterThanOrEqual(0.01);
    expect(a.axes.yaw.signal?.usable).toBe(true);
  });

  it("a baseline log with a dead axis keeps that axis out of every comparison", () => {
    const dead = analyzeWith({ seed: 103, durationS: DURATION_S }, (b) =>
      b.gyro[2].fill(0, 0, b.n),
    );
    const b = buildBaseline([analyzeDemoLog({ seed: 101, durationS: DURATION_S }).analysis, dead]);
    expect(b.unusableAxes?.map((u) => u.axis)).toEqual(["yaw"]);
    const r = compareWithBaseline(analyzeDemoLog({ seed: 8, durationS: DURATION_S }).analysis, b);
    expect(r.notCompared.find((n) => n.what === "yaw axis")?.reason).toMatch(
      /not usable in the baseline/,
    );
    expect(r.findings.every((f) => f.axis !== "yaw")).toBe(true);
  });
});

describe("the queue with an unusable log", () => {
  it("shows 'log unusable' and never ok", () => {
    const facts: AirframeFacts = {
      id: "x",
      name: "X",
      state: "ready",
      hasBaseline: true,
      openCrashes: [],
      partsPastLife: [],
      noLogSince: null,
      inNextHeat: false,
      latest: {
        status: "watch",
        score: null,
        findings: [],
        flownAt: new Date("2026-11-30T10:00:00Z"),
      },
    };
    const [entry] = rankQueue([facts]);
    expect(entry?.status).not.toBe("ok");
    expect(entry?.reasons[0]).toMatch(/^log unusable/);
  });
});
