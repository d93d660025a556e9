import { describe, expect, it } from "vitest";
import { rankQueue, type AirframeFacts } from "@/lib/health/queue-rank";

// The queue's ordering rules are heatcheck's own (README, "How a log is judged"): a crash with no
// inspection after it grounds the quad; status first, then the lower score.
const LATEST: NonNullable<AirframeFacts["latest"]> = {
  status: "ok",
  score: 100,
  findings: [],
  flownAt: new Date("2026-11-30T10:00:00Z"),
};
const base: AirframeFacts = {
  id: "",
  name: "",
  state: "ready",
  latest: LATEST,
  hasBaseline: true,
  openCrashes: [],
  partsPastLife: [],
  noLogSince: null,
  inNextHeat: false,
};

describe("rankQueue", () => {
  it("orders by status, then by the lower score, and says why in words", () => {
    const q = rankQueue([
      { ...base, id: "a", name: "A" },
      { ...base, id: "b", name: "B", latest: { ...LATEST, status: "inspect", score: 60 } },
      { ...base, id: "c", name: "C", latest: { ...LATEST, status: "inspect", score: 45 } },
      {
        ...base,
        id: "d",
        name: "D",
        openCrashes: [
          { at: new Date("2026-11-30T11:00:00Z"), severity: "hard", positions: ["arm rear-left"] },
        ],
      },
      {
        ...base,
        id: "e",
        name: "E",
        partsPastLife: [{ position: "props", what: "prop-set Tri", fraction: 1.2 }],
      },
    ]);
    expect(q.map((e) => e.name)).toEqual(["D", "C", "B", "E", "A"]);
    expect(q[0]?.status).toBe("ground");
    expect(q[0]?.reasons[0]).toMatch(
      /hard crash on 30 Nov, 11:00 UTC \(arm rear-left\) with no inspection since/,
    );
    expect(q[3]?.status).toBe("watch");
    expect(q[3]?.reasons[0]).toMatch(/used 120 % of its life limit/);
  });
  it("of two grounded airframes the lower score comes first, however many reasons the other has", () => {
    // Below 10 the score moves in tenths (lib/health/thresholds.ts): 0.7 against 2.5 must still
    // decide before a second part past its life does.
    const grounded = { ...LATEST, status: "ground" as const };
    const q = rankQueue([
      {
        ...base,
        id: "b",
        name: "B",
        latest: { ...grounded, score: 2.5 },
        partsPastLife: [
          { position: "props", what: "prop-set Tri", fraction: 1.2 },
          { position: "motor 1", what: "stator", fraction: 1.1 },
        ],
      },
      { ...base, id: "a", name: "A", latest: { ...grounded, score: 0.7 } },
    ]);
    expect(q.map((e) => e.name)).toEqual(["A", "B"]);
  });

  it("a minor crash asks for an inspection, and no baseline is said plainly", () => {
    const [entry] = rankQueue([
      {
        ...base,
        hasBaseline: false,
        latest: null,
        openCrashes: [{ at: new Date(), severity: "minor", positions: [] }],
      },
    ]);
    expect(entry?.status).toBe("inspect");
    expect(entry?.reasons.join(" ")).toMatch(/no baseline set/);
  });
});
