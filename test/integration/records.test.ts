import { existsSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import type { DemoLogOptions } from "@/lib/demo/generator";
import {
  ConflictError,
  ForbiddenError,
  InputError,
  LimitExceededError,
  NotFoundError,
  UnauthenticatedError,
} from "@/lib/errors";
import type { Actor, Role } from "@/lib/roles";
import { freshDatabase } from "../support/test-db";
import { makeTeam } from "../support/team";

// Integration tests on a real SQLite file migrated with the committed migrations: no mocks.
const { dir } = freshDatabase("records");
const { db } = await import("@/lib/server/db");
const { createAirframe } = await import("@/lib/server/airframes");
const { createParts, swapPart } = await import("@/lib/server/parts");
const { logCrash, recordInspection } = await import("@/lib/server/crashes");
const { ingestLog } = await import("@/lib/server/ingest");
const { analysesSettled } = await import("@/lib/server/analysis-jobs");
const { storedFileOf } = await import("@/lib/server/data-folder");
const { setBaseline } = await import("@/lib/server/baselines");
const { inspectionQueue } = await import("@/lib/server/queue");
const { createToken, revokeToken, inviteMember } = await import("@/lib/server/team");
const { actorForUser, requireToken } = await import("@/lib/server/guard");
const { createEvent } = await import("@/lib/server/events");
const { changePassword, assertMemberOf, myTeams } = await import("@/lib/server/account");
const { hashPassword } = await import("@/lib/server/passwords");
const bcrypt = (await import("bcryptjs")).default;

const actors = {} as Record<Role, Actor>;
let other: Actor;

function csvBody(
  options: Partial<DemoLogOptions>,
  airframe: string,
  flownAt: string,
): AsyncIterable<Uint8Array> {
  return Readable.from([
    Buffer.from(
      demoCsv({ seed: 1, durationS: 16, sampleRateHz: 2000, ...options }, { airframe, flownAt }),
    ),
  ]);
}

let kiteId = "";
let hawkId = "";

beforeAll(async () => {
  Object.assign(actors, await makeTeam("Alpha"));
  other = (await makeTeam("Bravo")).tech;
  kiteId = (
    await createAirframe(actors.tech, {
      name: "Kite-1",
      frameDesign: "test frame",
      serial: "",
      notes: "",
    })
  ).id;
  hawkId = (
    await createAirframe(actors.tech, {
      name: "Hawk-2",
      frameDesign: "test frame",
      serial: "",
      notes: "",
    })
  ).id;
});

describe("parts and swaps (model rules)", () => {
  it("a swap closes the old installation and opens the new one, both recorded", async () => {
    const [armA, armB] = await createParts(actors.tech, {
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
    if (!armA || !armB) throw new Error("parts not created");
    const at1 = new Date("2026-11-01T10:00:00Z");
    const at2 = new Date("2026-11-02T10:00:00Z");
    await swapPart(actors.tech, {
      airframeId: kiteId,
      position: "arm front-left",
      newPartId: armA.id,
      reason: "build",
      removedStatus: "stock",
      at: at1,
    });
    const r = await swapPart(actors.tech, {
      airframeId: kiteId,
      position: "arm front-left",
      newPartId: armB.id,
      reason: "cracked",
      removedStatus: "damaged",
      at: at2,
    });
    expect(r.removedPartId).toBe(armA.id);
    const installs = await db.installation.findMany({
      where: { airframeId: kiteId, position: "arm front-left" },
      orderBy: { fromAt: "asc" },
    });
    expect(installs).toHaveLength(2);
    expect(installs[0]?.toAt?.toISOString()).toBe(at2.toISOString());
    expect(installs[0]?.removalReason).toBe("cracked");
    expect(installs[1]?.toAt).toBeNull();
    expect((await db.part.findUnique({ where: { id: armA.id } }))?.status).toBe("damaged");
    expect((await db.part.findUnique({ where: { id: armB.id } }))?.status).toBe("installed");
    expect(
      await db.auditEntry.count({ where: { teamId: actors.tech.teamId, action: "swap" } }),
    ).toBe(2);
  });

  it("a part is on one airframe at a time", async () => {
    const installed = await db.installation.findFirst({
      where: { airframeId: kiteId, toAt: null },
    });
    await expect(
      swapPart(actors.tech, {
        airframeId: hawkId,
        position: "arm front-left",
        newPartId: installed?.partId ?? "",
        reason: "borrow",
        removedStatus: "stock",
        at: new Date(),
      }),
    ).rejects.toBeInstanceOf(ConflictError);
    expect(await db.installation.count({ where: { airframeId: hawkId } })).toBe(0);
  });
});

describe("uploads", () => {
  it("rejects an unknown airframe, an oversized file and a file without gyro columns, keeping nothing", async () => {
    const before = await db.flightLog.count();
    await expect(
      ingestLog(actors.pilot, {
        fileName: "x.csv",
        body: csvBody({}, "Nobody", "2026-11-01T00:00:00Z"),
      }),
    ).rejects.toBeInstanceOf(InputError);
    process.env.HEATCHECK_MAX_UPLOAD_MB = "0.1";
    await expect(
      ingestLog(actors.pilot, {
        fileName: "big.csv",
        body: csvBody({}, "Kite-1", "2026-11-01T00:00:00Z"),
      }),
    ).rejects.toBeInstanceOf(LimitExceededError);
    delete process.env.HEATCHECK_MAX_UPLOAD_MB;
    const noGyro = Readable.from([Buffer.from("time_us,speed\n0,1\n")]);
    await expect(
      ingestLog(actors.pilot, { fileName: "kite-1-bad.csv", body: noGyro }),
    ).rejects.toThrow(/no column for roll/);
    expect(await db.flightLog.count()).toBe(before);
    expect(
      readdirSync(join(dir, "uploads"), { recursive: true })
        .map(String)
        .filter((f) => f.includes("incoming-")),
    ).toEqual([]);
  });

  it("stores the original, recognises a re-upload, and refuses a log too short to analyse at upload", async () => {
    const r1 = await ingestLog(actors.pilot, {
      fileName: "kite.csv",
      body: csvBody({ seed: 3 }, "Kite-1", "2026-11-03T10:00:00Z"),
    });
    expect(r1.matchedBy).toBe("metadata");
    const r2 = await ingestLog(actors.pilot, {
      fileName: "again.csv",
      body: csvBody({ seed: 3 }, "Kite-1", "2026-11-03T10:00:00Z"),
    });
    expect(r2).toMatchObject({ logId: r1.logId, duplicate: true });
    const cut = demoCsv(
      { seed: 4, durationS: 16, sampleRateHz: 2000 },
      { airframe: "Kite-1" },
    ).slice(0, 600);
    const before = await db.flightLog.count();
    // Validated while it streams: refused with the reader's sentence (422), nothing recorded or kept.
    await expect(
      ingestLog(actors.pilot, { fileName: "cut.csv", body: Readable.from([Buffer.from(cut)]) }),
    ).rejects.toThrow(/one analysis segment needs/);
    expect(await db.flightLog.count()).toBe(before);
    await analysesSettled();
    const log1 = await db.flightLog.findUnique({ where: { id: r1.logId } });
    expect(log1?.status).toBe("analysed");
    expect(existsSync(storedFileOf(log1?.storedPath ?? "missing"))).toBe(true);
    expect(log1?.storedPath).toBe(`uploads/${actors.pilot.teamId}/${log1?.contentHash ?? ""}.csv`);
  });
});

describe("baselines", () => {
  it("setting a baseline scores the later logs, and a new baseline scores them again", async () => {
    const good = await ingestLog(actors.pilot, {
      fileName: "hawk-good.csv",
      body: csvBody({ seed: 10, airframeSeed: 2 }, "Hawk-2", "2026-11-05T10:00:00Z"),
    });
    const later = await ingestLog(actors.pilot, {
      fileName: "hawk-later.csv",
      body: csvBody(
        { seed: 11, airframeSeed: 2, scenario: "loose-stack", severity: 3 },
        "Hawk-2",
        "2026-11-06T10:00:00Z",
      ),
    });
    await analysesSettled();
    const first = await setBaseline(actors.tech, hawkId, [good.logId], "after build");
    expect(first.rescored).toBe(1);
    const a1 = await db.assessment.findUnique({
      where: { logId_baselineId: { logId: later.logId, baselineId: first.baseline.id } },
    });
    expect(a1).not.toBeNull();
    expect(a1?.score ?? 100).toBeLessThan(80);
    const second = await setBaseline(actors.tech, hawkId, [good.logId], "same log, new reason");
    const a2 = await db.assessment.findUnique({
      where: { logId_baselineId: { logId: later.logId, baselineId: second.baseline.id } },
    });
    expect(a2?.score).toBe(a1?.score);
    expect(await db.baseline.count({ where: { airframeId: hawkId, active: true } })).toBe(1);
  });

  it("a log uploaded after the baseline is scored when its analysis finishes", async () => {
    const r = await ingestLog(actors.pilot, {
      fileName: "hawk-3.csv",
      body: csvBody({ seed: 12, airframeSeed: 2 }, "Hawk-2", "2026-11-07T10:00:00Z"),
    });
    await analysesSettled();
    expect(await db.assessment.count({ where: { logId: r.logId } })).toBe(1);
  });
});

describe("the inspection queue", () => {
  it("a crash without a later inspection puts the airframe at the top; an inspection clears it", async () => {
    await logCrash(actors.pilot, {
      airframeId: kiteId,
      at: new Date(),
      heatId: null,
      severity: "hard",
      positions: ["arm rear-left"],
      note: "",
      ground: true,
    });
    let q = await inspectionQueue(actors.viewer);
    expect(q.entries[0]?.name).toBe("Kite-1");
    expect(q.entries[0]?.status).toBe("ground");
    expect(q.entries[0]?.reasons.join(" ")).toMatch(/hard crash .* no inspection since/);
    await recordInspection(actors.tech, {
      airframeId: kiteId,
      at: new Date(Date.now() + 1000),
      findings: "arm replaced",
      checklist: [],
      returnToService: true,
    });
    q = await inspectionQueue(actors.viewer);
    const kite = q.entries.find((e) => e.name === "Kite-1");
    expect(kite?.reasons.join(" ")).not.toMatch(/crash/);
  });

  it("the queue is ranked once per database change: reads share it, a write makes a new one", async () => {
    const first = await inspectionQueue(actors.viewer);
    const again = await inspectionQueue(actors.viewer);
    expect(again.entries).toBe(first.entries);
    // After the inspection above (dated a second ahead), so the crash is open.
    await logCrash(actors.pilot, {
      airframeId: kiteId,
      at: new Date(Date.now() + 5000),
      heatId: null,
      severity: "minor",
      positions: [],
      note: "",
      ground: false,
    });
    const after = await inspectionQueue(actors.viewer);
    expect(after.entries).not.toBe(first.entries);
    expect(after.entries.find((e) => e.name === "Kite-1")?.reasons.join(" ")).toMatch(/crash/);
  });
});

describe("the guard: roles and teams", () => {
  it("each role may do what it should and no more (ForbiddenError otherwise)", async () => {
    const crash = (a: Actor) =>
      logCrash(a, {
        airframeId: kiteId,
        at: new Date(),
        heatId: null,
        severity: "minor",
        positions: [],
        note: "",
        ground: false,
      });
    const event = (a: Actor) => createEvent(a, { name: "E", venue: "", startsAt: new Date() });
    const token = (a: Actor) => createToken(a, "t");
    await expect(crash(actors.viewer)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(crash(actors.pilot)).resolves.toBeTruthy();
    await expect(event(actors.pilot)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(event(actors.tech)).resolves.toBeTruthy();
    await expect(token(actors.tech)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(token(actors.owner)).resolves.toBeTruthy();
    await expect(
      inviteMember(actors.tech, {
        email: "x@y.test",
        name: "x",
        role: "viewer",
        password: "gravel-pit-lantern-9",
      }),
    ).rejects.toBeInstanceOf(ForbiddenError);
    await expect(
      ingestLog(actors.viewer, {
        fileName: "v.csv",
        body: csvBody({}, "Kite-1", "2026-11-09T00:00:00Z"),
      }),
    ).rejects.toBeInstanceOf(ForbiddenError);
  });

  it("another team's ids are not found, and nothing of theirs changes", async () => {
    await expect(
      logCrash(other, {
        airframeId: kiteId,
        at: new Date(),
        heatId: null,
        severity: "hard",
        positions: [],
        note: "",
        ground: true,
      }),
    ).rejects.toBeInstanceOf(NotFoundError);
    await expect(setBaseline(other, hawkId, [], "x")).rejects.toBeInstanceOf(NotFoundError);
    const part = await db.part.findFirst({
      where: { teamId: actors.tech.teamId, status: "stock" },
    });
    const bravoAirframe = await createAirframe(other, {
      name: "B-1",
      frameDesign: "f",
      serial: "",
      notes: "",
    });
    await expect(
      swapPart(other, {
        airframeId: bravoAirframe.id,
        position: "frame",
        newPartId: part?.id ?? "none",
        reason: "x",
        removedStatus: "stock",
        at: new Date(),
      }),
    ).rejects.toBeInstanceOf(NotFoundError);
    const q = await inspectionQueue(other);
    expect(q.entries.map((e) => e.name)).toEqual(["B-1"]);
  });

  it("an API token acts as a pilot of its own team until revoked", async () => {
    const { token, id } = await createToken(actors.owner, "field laptop");
    const request = (t: string) =>
      new Request("http://x/api/v1/queue", { headers: { authorization: `Bearer ${t}` } });
    const actor = await requireToken(request(token));
    expect(actor).toMatchObject({ teamId: actors.owner.teamId, role: "pilot", via: "token" });
    await expect(requireToken(request(token), "tech")).rejects.toBeInstanceOf(ForbiddenError);
    await expect(requireToken(request("hc_wrong"))).rejects.toBeInstanceOf(UnauthenticatedError);
    await revokeToken(actors.owner, id);
    await expect(requireToken(request(token))).rejects.toBeInstanceOf(UnauthenticatedError);
    const stored = await db.apiToken.findUnique({ where: { id } });
    expect(stored?.tokenHash).not.toContain(token);
  });
});

describe("accounts", () => {
  it("a member of two teams works in the one they chose, else in their first", async () => {
    const userId = actors.viewer.userId ?? "";
    await db.membership.create({ data: { userId, teamId: other.teamId, role: "tech" } });
    expect((await actorForUser(userId, other.teamId, "viewer")).role).toBe("tech");
    expect((await actorForUser(userId, "not-a-team", "viewer")).teamId).toBe(actors.viewer.teamId);
    expect((await myTeams(actors.viewer)).map((m) => m.teamId).sort()).toEqual(
      [actors.viewer.teamId, other.teamId].sort(),
    );
    await expect(assertMemberOf(actors.pilot, other.teamId)).rejects.toBeInstanceOf(ForbiddenError);
  });

  it("changing a password needs the current one and stores only a new bcrypt hash", async () => {
    const id = actors.pilot.userId ?? "";
    await db.user.update({
      where: { id },
      data: { passwordHash: await hashPassword("first-password-1") },
    });
    await expect(
      changePassword(actors.pilot, "wrong", "second-pass-word-2"),
    ).rejects.toBeInstanceOf(InputError);
    await changePassword(actors.pilot, "first-password-1", "second-pass-word-2");
    const user = await db.user.findUnique({ where: { id } });
    expect(user?.passwordHash).not.toContain("second-pass-word-2");
    expect(await bcrypt.compare("second-pass-word-2", user?.passwordHash ?? "")).toBe(true);
  });
});
