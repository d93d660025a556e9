import { describe, expect, it } from "vitest";
import {
  buildFleetReference,
  judgeAgainstFleet,
  medianAbsoluteDeviation,
  MIN_FLEET_AIRFRAMES,
  OUTLIER_Z,
  robustZ,
  type FleetMember,
} from "@/lib/health/fleet-reference";

// Robust statistics: median and median absolute deviation, modified z-score > 3.5 as the outlier
// rule (Iglewicz & Hoaglin, "How to Detect and Handle Outliers", ASQC 1993). Every expected value
// below is worked by hand in the comment beside it. The frequencies are invented test inputs.

const member = (
  id: string,
  yawHz: number,
  pitchHz = 238,
  extra: Partial<FleetMember> = {},
): FleetMember => ({
  id,
  name: id,
  modes: [
    { axis: "pitch", freqHz: pitchHz },
    { axis: "yaw", freqHz: yawHz },
  ],
  levels: [],
  ...extra,
});
const labels = { bandLabel: (b: number) => `band ${b}`, throttleLabel: (t: number) => `band ${t}` };

describe("median absolute deviation (hand computation)", () => {
  it("of [1, 1, 2, 2, 4, 6, 9] is 1", () => {
    // median 2; |x − 2| = [1, 1, 0, 0, 2, 4, 7] → sorted [0, 0, 1, 1, 2, 4, 7] → median 1
    expect(medianAbsoluteDeviation([1, 1, 2, 2, 4, 6, 9])).toBe(1);
  });
  it("robust z floors the spread", () => {
    expect(robustZ(10, 0, 0, 2)).toBe(5);
    expect(robustZ(10, 0, 4, 2)).toBe(2.5);
  });
});

describe("the fleet reference", () => {
  it("with 1 and 2 airframes says it is not enough and judges nothing", () => {
    for (const n of [1, 2]) {
      const members = Array.from({ length: n }, (_, i) => member(`A${i}`, 310));
      const ref = buildFleetReference("test frame", members);
      expect(ref.airframes).toBe(n);
      expect(ref.enough).toBe(false);
      expect(judgeAgainstFleet(ref, member("X", 250), { what: "log", ...labels })).toEqual([]);
    }
  });

  it("with 3 airframes it is enough (the stated minimum)", () => {
    expect(MIN_FLEET_AIRFRAMES).toBe(3);
    const ref = buildFleetReference("test frame", [
      member("A", 308),
      member("B", 310),
      member("C", 312),
    ]);
    expect(ref.enough).toBe(true);
    // yaw: median 310; |x − 310| = [2, 0, 2] → MAD 2 → σ = 1.4826 · 2 = 2.9652
    const yaw = ref.modes.find((m) => m.axis === "yaw");
    expect(yaw?.medianHz).toBe(310);
    expect(yaw?.sigmaHz).toBeCloseTo(2.9652, 10);
  });

  it("with 8 airframes finds the one whose baseline mode sits low, leaving it out of its own reference", () => {
    const yaw = [310, 312, 308, 311, 309, 313, 290, 310];
    const members = yaw.map((f, i) => member(`HV-0${i + 1}`, f));
    const all = buildFleetReference("test frame", members);
    // sorted [290, 308, 309, 310, 310, 311, 312, 313] → median 310; deviations sorted
    // [0, 0, 1, 1, 2, 2, 3, 20] → MAD 1.5 → σ = 2.2239
    const m = all.modes.find((x) => x.axis === "yaw");
    expect(m?.medianHz).toBe(310);
    expect(m?.sigmaHz).toBeCloseTo(2.2239, 4);

    // HV-07 left out: [308, 309, 310, 310, 311, 312, 313] → median 310, MAD 1 → σ 1.4826, floored
    // at 1 % of 310 = 3.1 Hz; z = (290 − 310)/3.1 = −6.45 < −3.5; deviation −6.45 % (watch..inspect).
    const ref = buildFleetReference("test frame", members, "HV-07");
    expect(ref.airframes).toBe(7);
    const notes = judgeAgainstFleet(ref, members[6] as FleetMember, {
      what: "baseline",
      ...labels,
    });
    expect(notes).toHaveLength(1);
    expect(notes[0]).toMatchObject({
      kind: "mode-off-fleet",
      axis: "yaw",
      fleetHz: 310,
      deviationPct: -6.5,
      z: -6.5,
      severity: "watch",
    });
    expect(notes[0]?.text).toContain(
      "HV-07's baseline yaw (torsion) mode at 290 Hz sits 6.5 % below the median of 7 sister airframes of test frame (310 Hz)",
    );
    expect(notes[0]?.text).toContain("was the baseline taken after damage");

    // A sister that sits 0.6 % off (z = −2/3.1 = −0.65) is not questioned.
    const hv03 = buildFleetReference("test frame", members, "HV-03");
    expect(
      judgeAgainstFleet(hv03, members[2] as FleetMember, { what: "baseline", ...labels }),
    ).toEqual([]);
    expect(Math.abs(robustZ(308, 310, 1.4826, 3.1))).toBeLessThan(OUTLIER_Z);
  });

  it("judges a log of an airframe without a baseline, never by the outlier's own values", () => {
    const members = [308, 309, 310, 311, 312].map((f, i) =>
      member(`A${i}`, f, 238, {
        levels: [{ throttleBand: 3, axis: "roll", band: 4, db: -10 + (i % 2) }],
      }),
    );
    const ref = buildFleetReference("test frame", members);
    // levels: [-10, -9, -10, -9, -10] → median −10, MAD 0 → σ floored at 1.5 dB
    const level = ref.levels.find((l) => l.axis === "roll");
    expect(level).toMatchObject({ medianDb: -10, sigmaDb: 0, airframes: 5 });
    const subject = member("NEW", 280, 238, {
      levels: [{ throttleBand: 3, axis: "roll", band: 4, db: -2 }],
    });
    const notes = judgeAgainstFleet(ref, subject, { what: "log", ...labels });
    // yaw: (280 − 310)/310 = −9.68 % → inspect (6 % ≤ x < 12 %); roll band: +8 dB, z = 8/1.5 = 5.3 → inspect
    expect(notes.map((n) => [n.kind, n.severity])).toEqual([
      ["mode-off-fleet", "inspect"],
      ["level-above-fleet", "inspect"],
    ]);
    expect(notes[0]?.text).toContain("judged against the fleet, no baseline of its own");
    // A log of an airframe with a baseline of its own was scored against that baseline; the
    // fleet's notes then name the log without saying it has none.
    const seconded = judgeAgainstFleet(ref, subject, { what: "log-beside-baseline", ...labels });
    expect(seconded.map((n) => n.kind)).toEqual(notes.map((n) => n.kind));
    expect(seconded[0]?.text.startsWith("NEW's log ")).toBe(true);
    expect(seconded[0]?.text).not.toContain("no baseline of its own");
  });

  it("says when a mode every sister has is missing", () => {
    const members = [308, 309, 310, 311].map((f, i) => member(`A${i}`, f));
    const ref = buildFleetReference("test frame", members);
    const subject: FleetMember = {
      id: "S",
      name: "S",
      modes: [{ axis: "pitch", freqHz: 238 }],
      levels: [],
    };
    const notes = judgeAgainstFleet(ref, subject, { what: "log", ...labels });
    expect(notes).toHaveLength(1);
    expect(notes[0]).toMatchObject({ kind: "mode-missing", axis: "yaw", severity: "watch" });
  });
});
