import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import type { DemoLogOptions } from "@/lib/demo/generator";
import type { Actor, Role } from "@/lib/roles";
import { freshDatabase } from "../support/test-db";
import { makeTeam } from "../support/team";

// The baseline's life across a repair, on a real SQLite file through the services the screens
// use: swap an arm → the queue says the baseline is stale → the first post-repair log has its
// mode change "changed after repair" while damage elsewhere is still scored → the tech confirms a
// post-repair log as the new baseline, the old one stays in the history. Logs are the demo
// generator's; the new arm's different stiffness is played by its cracked-arm scenario (a lower
// pitch mode), which is what a softer arm looks like to the gyro.
freshDatabase("repairs");
const { db } = await import("@/lib/server/db");
const { createAirframe } = await import("@/lib/server/airframes");
const { ingestLog } = await import("@/lib/server/ingest");
const { analysesSettled } = await import("@/lib/server/analysis-jobs");
const { setBaseline } = await import("@/lib/server/baselines");
const { createParts, swapPart } = await import("@/lib/server/parts");
const { inspectionQueue } = await import("@/lib/server/queue");

const actors = {} as Record<Role, Actor>;
let airframeId = "";
let seed = 300;
const day = (d: number, h = 10) => new Date(Date.UTC(2026, 10, d, h));

async function upload(options: Partial<DemoLogOptions>, flownAt: Date): Promise<string> {
  const csv = demoCsv(
    { seed: seed++, durationS: 24, sampleRateHz: 2000, ...options },
    { airframe: "R-1", flownAt: flownAt.toISOString() },
  );
  const r = await ingestLog(actors.pilot, {
    fileName: `r1-${seed}.csv`,
    body: Readable.from([Buffer.from(csv)]),
  });
  await analysesSettled();
  return r.logId;
}

async function assessmentOf(logId: string) {
  const a = await db.assessment.findFirst({ where: { logId, baseline: { active: true } } });
  if (!a) throw new Error("no assessment");
  return {
    ...a,
    findings: JSON.parse(a.findings) as {
      kind: string;
      points: number;
      repair?: string;
      text: string;
      motor?: number;
    }[],
  };
}

async function queueRow() {
  const { entries } = await inspectionQueue(actors.viewer);
  const row = entries.find((e) => e.name === "R-1");
  if (!row) throw new Error("R-1 not on the queue");
  return row;
}

beforeAll(async () => {
  Object.assign(actors, await makeTeam("Repair test club"));
  airframeId = (
    await createAirframe(actors.tech, {
      name: "R-1",
      frameDesign: "test frame",
      serial: "",
      notes: "",
    })
  ).id;
  const [arm, spare] = await createParts(actors.tech, {
    kind: "arm",
    model: "test arm",
    label: "arm",
    supplier: "",
    cost: null,
    acquiredAt: null,
    lifeFlights: null,
    lifeMinutes: null,
    quantity: 2,
    notes: "",
  });
  if (!arm || !spare) throw new Error("parts not created");
  await swapPart(actors.tech, {
    airframeId,
    position: "arm rear-left",
    newPartId: arm.id,
    reason: "initial build",
    removedStatus: "stock",
    at: day(1),
  });
  const good = await upload({}, day(2));
  await setBaseline(actors.tech, airframeId, [good], "known-good");
  await swapPart(actors.tech, {
    airframeId,
    position: "arm rear-left",
    newPartId: spare.id,
    reason: "arm cracked in a crash",
    removedStatus: "damaged",
    at: day(5),
  });
}, 120_000);

describe("a baseline across a repair", () => {
  let postRepair = "";

  it("after the swap the queue says the baseline is stale and what to do", async () => {
    const row = await queueRow();
    expect(row.reasons).toContain(
      "arm rear-left replaced on 5 Nov: fly one log, then confirm a new baseline",
    );
    expect(row.status).not.toBe("ok");
  });

  it("the first post-repair log shows the new arm's mode change as changed after repair, not as damage", async () => {
    postRepair = await upload({ scenario: "cracked-arm", severity: 2 }, day(6));
    const a = await assessmentOf(postRepair);
    const explained = a.findings.filter((f) => f.repair);
    expect(explained.map((f) => f.kind)).toContain("mode-shift");
    expect(
      explained.every(
        (f) =>
          f.points === 0 &&
          f.text.startsWith("changed after repair (arm rear-left replaced on 5 Nov)"),
      ),
    ).toBe(true);
    expect(a.score).toBeGreaterThanOrEqual(80);
    // Stale baseline: watch at best.
    expect(a.status).toBe("watch");
    expect(
      (await queueRow()).reasons.some((r) =>
        r.includes("1 log flown since — check them, then confirm a new baseline"),
      ),
    ).toBe(true);
  });

  let prop = "";
  it("damage the repair does not explain is still scored", async () => {
    prop = await upload({ scenario: "bent-prop", severity: 3, position: 2 }, day(6, 12));
    const a = await assessmentOf(prop);
    const scored = a.findings.filter((f) => !f.repair && f.points > 0);
    expect(scored.some((f) => f.kind === "motor-order" && f.motor === 2)).toBe(true);
    expect(["inspect", "ground"]).toContain(a.status);
  });

  it("confirming a post-repair log as the new baseline ends the stale state and keeps the old baseline", async () => {
    await setBaseline(
      actors.tech,
      airframeId,
      [postRepair],
      "post-repair check after the arm swap",
    );
    const baselines = await db.baseline.findMany({
      where: { airframeId },
      orderBy: { createdAt: "asc" },
    });
    expect(baselines.map((b) => b.active)).toEqual([false, true]);
    const row = await queueRow();
    expect(row.reasons.some((r) => r.includes("confirm a new baseline"))).toBe(false);
    // The later log is judged again against the new baseline, with no repair left to explain anything.
    const again = await assessmentOf(prop);
    expect(again.findings.filter((f) => f.repair)).toEqual([]);
  });
});
