import { describe, expect, it } from "vitest";
import { analyzeDemoLog } from "@/lib/demo/analyze-demo";
import { buildBaseline } from "@/lib/health/baseline";
import { compareWithBaseline } from "@/lib/health/compare";
import { analyzeWith } from "../support/demo-feed";

function set(a: Float64Array | undefined, i: number, v: number): void {
  if (a) a[i] = v;
}

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
