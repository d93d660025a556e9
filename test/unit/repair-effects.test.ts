import { describe, expect, it } from "vitest";
import type { Finding } from "@/lib/health/compare";
import {
  motorAt,
  repairsSince,
  separateRepairEffects,
  staleBaselineReason,
  type Repair,
} from "@/lib/health/repair-effects";

// Which findings a repair explains is a fact of the trade (common practice): a new arm or frame
// moves the structural modes, a new motor brings its own balance, a new prop set changes every
// motor's orders. The findings below are constructed inputs; the score rule is the comparison's
// own (100 minus points, never better than the worst remaining finding).

const finding = (kind: Finding["kind"], points: number, extra: Partial<Finding> = {}): Finding => ({
  axis: "pitch",
  kind,
  freqHz: 230,
  severity: points >= 25 ? "inspect" : "watch",
  points,
  text: `${kind} text`,
  ...extra,
});

const at = (d: string) => new Date(`2026-12-0${d}T10:00:00Z`);
const armSwap: Repair = { at: at("2"), position: "arm rear-left", kind: "arm", model: "arm 6 mm" };
const motorSwap: Repair = {
  at: at("2"),
  position: "motor 3 (rear-right)",
  kind: "motor",
  model: "2207",
};

describe("what makes a baseline stale", () => {
  it("only spectrum-changing parts fitted after the baseline", () => {
    const vtx: Repair = {
      at: at("3"),
      position: "video transmitter",
      kind: "video-transmitter",
      model: "vtx",
    };
    const before: Repair = { ...armSwap, at: at("1") };
    expect(repairsSince(new Date("2026-12-01T12:00:00Z"), [vtx, before, armSwap])).toEqual([
      armSwap,
    ]);
  });
  it("says what was replaced and what to do", () => {
    expect(staleBaselineReason([armSwap], 0)).toBe(
      "arm rear-left replaced on 2 Dec: fly one log, then confirm a new baseline",
    );
    expect(staleBaselineReason([armSwap], 2)).toMatch(
      /2 logs flown since — check them, then confirm a new baseline/,
    );
  });
  it("reads motor numbers from position names", () => {
    expect(motorAt("motor 3 (rear-right)")).toBe(3);
    expect(motorAt("arm rear-left")).toBeNull();
  });
});

describe("the first log after a repair", () => {
  it("an arm swap explains mode shifts and new peaks, not a motor's orders", () => {
    const r = separateRepairEffects(
      {
        score: 40,
        status: "inspect",
        findings: [
          finding("mode-shift", 30),
          finding("new-peak", 10, { axis: "roll" }),
          finding("motor-order", 20, { motor: 2 }),
        ],
      },
      [armSwap],
    );
    expect(r.changedAfterRepair.map((f) => f.kind)).toEqual(["mode-shift", "new-peak"]);
    expect(
      r.changedAfterRepair.every(
        (f) =>
          f.points === 0 &&
          f.text.startsWith("changed after repair (arm rear-left replaced on 2 Dec)"),
      ),
    ).toBe(true);
    expect(r.findings.map((f) => f.kind)).toEqual(["motor-order"]);
    // 100 − 20 = 80 would be ok, but the motor finding is watch and a stale baseline is watch at best.
    expect(r.score).toBe(80);
    expect(r.status).toBe("watch");
  });
  it("a motor swap explains only that motor's findings; damage elsewhere stays", () => {
    const r = separateRepairEffects(
      {
        score: 35,
        status: "inspect",
        findings: [finding("motor-order", 25, { motor: 3 }), finding("mode-shift", 40)],
      },
      [motorSwap],
    );
    expect(r.changedAfterRepair.map((f) => f.motor)).toEqual([3]);
    expect(r.findings.map((f) => f.kind)).toEqual(["mode-shift"]);
    expect(r.score).toBe(60);
    expect(r.status).toBe("inspect");
  });
  it("with no repair nothing changes", () => {
    const a = { score: 90, status: "ok" as const, findings: [finding("band-rise", 10)] };
    expect(separateRepairEffects(a, [])).toEqual({ ...a, changedAfterRepair: [] });
  });
});
