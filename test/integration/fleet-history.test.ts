import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import type { DemoLogOptions } from "@/lib/demo/generator";
import type { Actor, Role } from "@/lib/roles";
import { freshDatabase } from "../support/test-db";
import { makeTeam } from "../support/team";

// The fleet as its own reference and the history export, on a real SQLite file through the same
// services the screens use. The logs are the demo generator's (invented airframes): each airframe
// gets its own manufacturing spread (airframeSeed); one baseline is flown with a cracked arm.
freshDatabase("fleet");
const { db } = await import("@/lib/server/db");
const { createAirframe } = await import("@/lib/server/airframes");
const { ingestLog } = await import("@/lib/server/ingest");
const { analysesSettled } = await import("@/lib/server/analysis-jobs");
const { setBaseline } = await import("@/lib/server/baselines");
const { fleetPlacement, fleetDesignView } = await import("@/lib/server/fleet");
const { logCrash } = await import("@/lib/server/crashes");
const { airframeHistory, historyCsv } = await import("@/lib/server/airframe-history");
const { fleetOverview } = await import("@/lib/server/fleet-overview");
const { inspectionQueue } = await import("@/lib/server/queue");
const { logView } = await import("@/lib/server/log-view");

const actors = {} as Record<Role, Actor>;
const ids: Record<string, string> = {};
const logIds: Record<string, string> = {};
let seed = 100;

async function upload(
  name: string,
  options: Partial<DemoLogOptions>,
  airframeSeed: number,
): Promise<string> {
  const csv = demoCsv(
    { seed: seed++, durationS: 24, sampleRateHz: 2000, airframeSeed, ...options },
    { airframe: name, flownAt: new Date(Date.UTC(2026, 10, 1, 10, seed)).toISOString() },
  );
  const r = await ingestLog(actors.pilot, {
    fileName: `${name}-${seed}.csv`,
    body: Readable.from([Buffer.from(csv)]),
  });
  return r.logId;
}

beforeAll(async () => {
  Object.assign(actors, await makeTeam("Fleet test club"));
  const names = ["F-1", "F-2", "F-3", "F-4", "F-5", "F-6"];
  for (const name of names)
    ids[name] = (
      await createAirframe(actors.tech, { name, frameDesign: "test frame", serial: "", notes: "" })
    ).id;
  // F-1..F-4 healthy baselines; F-5's baseline flown with a cracked arm (severity 3); F-6 has none.
  const baselineLogs: Record<string, string> = {};
  for (const [i, name] of names.slice(0, 5).entries()) {
    baselineLogs[name] = await upload(
      name,
      name === "F-5" ? { scenario: "cracked-arm", severity: 3 } : {},
      i,
    );
  }
  Object.assign(logIds, baselineLogs);
  logIds["F-6"] = await upload("F-6", {}, 5);
  await analysesSettled();
  for (const name of names.slice(0, 5))
    await setBaseline(actors.tech, ids[name] ?? "", [baselineLogs[name] ?? ""], "known-good");
}, 120_000);

describe("the fleet as its own reference", () => {
  it("questions the baseline that sits off its sisters, and only that one", async () => {
    const { placements } = await fleetPlacement(actors.viewer);
    const flagged = placements.filter((p) => p.notes.some((n) => n.kind === "mode-off-fleet"));
    expect(flagged.map((p) => p.name)).toEqual(["F-5"]);
    const note = flagged[0]?.notes.find((n) => n.kind === "mode-off-fleet");
    // The generator lowers the pitch bending mode by the crack; the reference is the other four.
    expect(note?.axis).toBe("pitch");
    expect(note?.deviationPct ?? 0).toBeLessThan(-3);
    expect(note?.text).toMatch(
      /^F-5's baseline pitch mode at \d+ Hz sits [\d.]+ % below the median of 4 sister airframes of test frame \(\d+ Hz\)/,
    );
    expect(flagged[0]?.reference.airframes).toBe(4);
  });

  it("the Fleet table says what the queue says: F-5's questioned baseline is not 'ok' on either", async () => {
    const [rows, queue] = await Promise.all([
      fleetOverview(actors.viewer),
      inspectionQueue(actors.viewer),
    ]);
    const fromQueue = Object.fromEntries(queue.entries.map((e) => [e.name, e.status]));
    for (const r of rows) expect([r.name, r.status]).toEqual([r.name, fromQueue[r.name] ?? null]);
    expect(rows.find((r) => r.name === "F-5")?.status).not.toBe("ok");
  });

  it("judges the airframe without a baseline against the fleet, labelled so", async () => {
    const { placements } = await fleetPlacement(actors.viewer);
    const f6 = placements.find((p) => p.name === "F-6");
    expect(f6?.judged).toBe("log");
    expect(f6?.reference.airframes).toBe(5);
    for (const n of f6?.notes ?? [])
      expect(n.text).toContain("judged against the fleet, no baseline of its own");
  });

  it("names a log on its page as judged by the fleet only where its airframe has no baseline", async () => {
    // F-5's log is its own (cracked) baseline: its page scores it against that baseline, and the
    // fleet's notes there are a second opinion. F-6 has no baseline: the fleet (five airframes)
    // stands in for one; it flies healthy and may draw no note, but any it draws say so.
    const f5 = await logView(actors.viewer, logIds["F-5"] ?? "");
    expect(f5.fleet.notes.length).toBeGreaterThan(0);
    for (const n of f5.fleet.notes) {
      expect(n.text.startsWith("F-5's log")).toBe(true);
      expect(n.text).not.toContain("no baseline of its own");
    }
    const f6 = await logView(actors.viewer, logIds["F-6"] ?? "");
    expect(f6.fleet.airframes).toBe(5);
    for (const n of f6.fleet.notes)
      expect(n.text).toContain("judged against the fleet, no baseline of its own");
  });

  it("draws a strip per shared mode with every baseline airframe on it", async () => {
    const [design] = await fleetDesignView(actors.viewer);
    expect(design?.airframes).toBe(5);
    expect(design?.enough).toBe(true);
    expect(design?.strips.length).toBeGreaterThanOrEqual(3);
    const pitch = design?.strips.filter((s) => s.axis === "pitch") ?? [];
    expect(pitch.some((s) => s.dots.some((d) => d.name === "F-5" && d.outlier))).toBe(true);
    expect(design?.withoutBaseline.map((w) => w.name)).toEqual(["F-6"]);
  });

  it("a grounded airframe does not count towards the reference", async () => {
    await logCrash(actors.pilot, {
      airframeId: ids["F-1"] ?? "",
      at: new Date(),
      heatId: null,
      severity: "hard",
      positions: [],
      note: "",
      ground: true,
    });
    const [design] = await fleetDesignView(actors.viewer);
    expect(design?.airframes).toBe(4);
  });
});

describe("the reference's size (1, 2, 3 and 8 airframes of one design)", () => {
  // An independent computation of the statistics the reference must report, written out here
  // (sort, middle, absolute deviations) rather than calling the module under test.
  const mid = (v: number[]) => {
    const s = [...v].sort((a, b) => a - b);
    const n = s.length;
    return n % 2 ? (s[(n - 1) / 2] ?? NaN) : ((s[n / 2 - 1] ?? NaN) + (s[n / 2] ?? NaN)) / 2;
  };

  it("is not enough with 1 and 2, enough from 3, and at 8 reports the median and 1.4826·MAD of the baselines' own modes", async () => {
    const ids8: string[] = [];
    for (let i = 0; i < 8; i++) {
      const name = `S-${i + 1}`;
      const id = (
        await createAirframe(actors.tech, {
          name,
          frameDesign: "size frame",
          serial: "",
          notes: "",
        })
      ).id;
      const csv = demoCsv(
        { seed: 700 + i, durationS: 24, sampleRateHz: 2000, airframeSeed: 20 + i },
        { airframe: name, flownAt: new Date(Date.UTC(2026, 10, 3, 10, i)).toISOString() },
      );
      const r = await ingestLog(actors.pilot, {
        fileName: `${name}.csv`,
        body: Readable.from([Buffer.from(csv)]),
      });
      await analysesSettled();
      await setBaseline(actors.tech, id, [r.logId], "known-good");
      ids8.push(id);
      if (![1, 2, 3, 8].includes(i + 1)) continue;
      const design = (await fleetDesignView(actors.viewer)).find((d) => d.design === "size frame");
      expect(design?.airframes).toBe(i + 1);
      expect(design?.enough).toBe(i + 1 >= 3);
    }
    const { designs } = await fleetPlacement(actors.viewer);
    const ref = designs.find((d) => d.design === "size frame");
    const baselines = await db.baseline.findMany({
      where: { airframeId: { in: ids8 }, active: true },
    });
    const yaw = baselines.map((b) =>
      (JSON.parse(b.json) as { modes: { axis: string; freqHz: number }[] }).modes
        .filter((m) => m.axis === "yaw")
        .map((m) => m.freqHz),
    );
    // The demo frame has one yaw mode (lib/demo/airframe-model.ts); each airframe's baseline shows it once.
    expect(yaw.every((v) => v.length === 1)).toBe(true);
    const f = yaw.map((v) => v[0] ?? NaN);
    const median = mid(f);
    const mad = mid(f.map((x) => Math.abs(x - median)));
    const mode = ref?.modes.find((m) => m.axis === "yaw");
    expect(mode?.members).toHaveLength(8);
    expect(mode?.medianHz).toBeCloseTo(median, 9);
    expect(mode?.sigmaHz).toBeCloseTo(1.4826 * mad, 9);
  }, 120_000);
});

describe("history export", () => {
  it("has every record and writes RFC 4180 CSV (quotes doubled, fields with commas quoted)", async () => {
    await logCrash(actors.pilot, {
      airframeId: ids["F-2"] ?? "",
      at: new Date("2026-11-20T12:00:00Z"),
      heatId: null,
      severity: "minor",
      positions: ["props"],
      note: 'clipped the "blue" gate, props chipped',
      ground: false,
    });
    const h = await airframeHistory(actors.viewer, "F-2");
    expect(h.logs).toHaveLength(1);
    expect(h.baselines).toHaveLength(1);
    expect(h.crashes).toHaveLength(1);
    const csv = historyCsv(h);
    expect(csv.split("\r\n")[0]).toBe("at,kind,position,part,score,verdict,detail");
    expect(csv).toContain(
      '2026-11-20T12:00:00.000Z,crash,props,,,minor,"clipped the ""blue"" gate, props chipped"\r\n',
    );
  });

  it("finds no airframe of another team", async () => {
    const outsider = (await makeTeam("Other")).owner;
    await expect(airframeHistory(outsider, "F-2")).rejects.toThrow(/was not found/);
  });
});
