import { rmSync } from "node:fs";
import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import { ANALYSIS_VERSION } from "@/lib/analysis/types";
import { BASELINE_VERSION } from "@/lib/health/baseline";
import { demoCsv } from "@/lib/demo/demo-csv";
import type { DemoLogOptions } from "@/lib/demo/generator";
import type { Actor, Role } from "@/lib/roles";
import { freshDatabase } from "../support/test-db";
import { makeTeam } from "../support/team";

// After an engine update the server derives again, by itself, what an earlier version stored
// (lib/server/engine-update.ts). On a real SQLite file: the stored analyses and the baseline
// are turned back into what version 2 wrote, then the start-up step is run.
freshDatabase("engine-update");
const { db } = await import("@/lib/server/db");
const { createAirframe } = await import("@/lib/server/airframes");
const { ingestLog } = await import("@/lib/server/ingest");
const { analysesSettled, reanalyseOutdated } = await import("@/lib/server/analysis-jobs");
const { setBaseline } = await import("@/lib/server/baselines");
const { storedFileOf } = await import("@/lib/server/data-folder");

const actors = {} as Record<Role, Actor>;
let airframeId = "";
const ids = { good: "", later: "", orphan: "" };

function upload(options: Partial<DemoLogOptions>, flownAt: string) {
  return ingestLog(actors.pilot, {
    fileName: `log-${options.seed ?? 0}.csv`,
    body: Readable.from([
      Buffer.from(
        demoCsv(
          { seed: 1, durationS: 16, sampleRateHz: 2000, airframeSeed: 3, ...options },
          { airframe: "Wren-1", flownAt },
        ),
      ),
    ]),
  });
}

/** Rewrites a stored analysis as version 2 wrote it (the same fields, the older version). */
async function makeOld(logId: string): Promise<void> {
  const row = await db.analysis.findUniqueOrThrow({ where: { logId } });
  const old = { ...(JSON.parse(row.json) as Record<string, unknown>), version: 2 };
  await db.analysis.update({ where: { logId }, data: { json: JSON.stringify(old) } });
}

beforeAll(async () => {
  Object.assign(actors, await makeTeam("Update"));
  airframeId = (
    await createAirframe(actors.tech, { name: "Wren-1", frameDesign: "t", serial: "", notes: "" })
  ).id;
  ids.good = (await upload({ seed: 20 }, "2026-11-10T10:00:00Z")).logId;
  ids.later = (
    await upload({ seed: 21, scenario: "bent-prop", severity: 3 }, "2026-11-11T10:00:00Z")
  ).logId;
  ids.orphan = (await upload({ seed: 22 }, "2026-11-12T10:00:00Z")).logId;
  await analysesSettled();
  await setBaseline(actors.tech, airframeId, [ids.good], "after build");
  for (const id of Object.values(ids)) await makeOld(id);
  // The baseline as version 2 built it: no order generation.
  const baseline = await db.baseline.findFirstOrThrow({ where: { airframeId, active: true } });
  const { orderGeneration: _, ...rest } = JSON.parse(baseline.json) as Record<string, unknown>;
  await db.baseline.update({
    where: { id: baseline.id },
    data: { json: JSON.stringify({ ...rest, version: 2 }) },
  });
  // One log's original is gone (a data folder restored without it).
  const orphan = await db.flightLog.findUniqueOrThrow({ where: { id: ids.orphan } });
  rmSync(storedFileOf(orphan.storedPath));
});

describe("start-up after an engine update", () => {
  it("analyses the old logs again, builds the baseline again from the same logs, and scores the later log against it", async () => {
    const before = await db.baseline.findFirstOrThrow({ where: { airframeId, active: true } });
    const { queued, done } = await reanalyseOutdated();
    // The good and the later log; the one whose original is gone keeps what it has.
    expect(queued).toBe(2);
    await done;
    await analysesSettled();
    const version = async (logId: string) =>
      (
        JSON.parse((await db.analysis.findUniqueOrThrow({ where: { logId } })).json) as {
          version: number;
        }
      ).version;
    expect(await version(ids.good)).toBe(ANALYSIS_VERSION);
    expect(await version(ids.later)).toBe(ANALYSIS_VERSION);
    expect(await version(ids.orphan)).toBe(2);
    expect((await db.flightLog.findUniqueOrThrow({ where: { id: ids.orphan } })).status).toBe(
      "analysed",
    );
    // Same baseline row (nobody's choice changed), built again by this engine.
    const after = await db.baseline.findFirstOrThrow({ where: { airframeId, active: true } });
    expect(after.id).toBe(before.id);
    expect(after.reason).toBe("after build");
    const json = JSON.parse(after.json) as { version: number; orderGeneration: number };
    expect(json.version).toBe(BASELINE_VERSION);
    expect(json.orderGeneration).toBe(2);
    const entry = await db.auditEntry.findFirst({ where: { action: "rebuild baseline" } });
    expect(entry?.entityId).toBe(airframeId);
    expect(entry?.userName).toBe("heatcheck");
    // The later log's verdict compares motor orders again (nothing says they were left out).
    const assessment = await db.assessment.findUniqueOrThrow({
      where: { logId_baselineId: { logId: ids.later, baselineId: after.id } },
    });
    const notCompared = JSON.parse(assessment.notCompared) as { what: string }[];
    expect(notCompared.map((n) => n.what)).not.toContain("motor orders");
  });

  it("finds nothing to do at the next start", async () => {
    const { queued, done } = await reanalyseOutdated();
    await done;
    expect(queued).toBe(0);
  });
});
