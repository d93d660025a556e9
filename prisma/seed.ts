// Seeds the invented demo team when the database is empty: `npm run seed` (also run by
// `npm start` on first start). Everything here is made up: team, people, quads and parts.
// It goes through the same services the app uses, so the model rules hold for the demo too.
import { createReadStream } from "node:fs";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { config } from "@/lib/config";
import { DEMO_ACCOUNTS } from "@/lib/demo/accounts";
import { demoCsv } from "@/lib/demo/demo-csv";
import type { DemoLogOptions } from "@/lib/demo/generator";
import type { Actor } from "@/lib/roles";
import { createAirframe } from "@/lib/server/airframes";
import { analysesSettled } from "@/lib/server/analysis-jobs";
import { setBaseline } from "@/lib/server/baselines";
import { logCrash, recordInspection } from "@/lib/server/crashes";
import { db } from "@/lib/server/db";
import { createEvent, createHeat, setHeatEntries } from "@/lib/server/events";
import { ingestLog } from "@/lib/server/ingest";
import { createParts, swapPart } from "@/lib/server/parts";
import { hashPassword } from "@/lib/server/passwords";
import type { PartKind } from "@/lib/validations/part";

const DEMO_TEAM = "Harrow Vale Quad Club";
const FRAME = "Harrow Five (house design)";
const HOUR = 3600_000;
const DAY = 24 * HOUR;
const LOG_SECONDS = 30;

const POSITIONS: { position: string; kind: PartKind; model: string; lifeFlights?: number }[] = [
  { position: "frame", kind: "frame", model: "Harrow Five plate set" },
  { position: "arm front-left", kind: "arm", model: "Harrow arm 6 mm" },
  { position: "arm front-right", kind: "arm", model: "Harrow arm 6 mm" },
  { position: "arm rear-right", kind: "arm", model: "Harrow arm 6 mm" },
  { position: "arm rear-left", kind: "arm", model: "Harrow arm 6 mm" },
  {
    position: "motor 1 (front-left)",
    kind: "motor",
    model: "Stator 2207 1850 kv",
    lifeFlights: 60,
  },
  {
    position: "motor 2 (front-right)",
    kind: "motor",
    model: "Stator 2207 1850 kv",
    lifeFlights: 60,
  },
  {
    position: "motor 3 (rear-right)",
    kind: "motor",
    model: "Stator 2207 1850 kv",
    lifeFlights: 60,
  },
  { position: "motor 4 (rear-left)", kind: "motor", model: "Stator 2207 1850 kv", lifeFlights: 60 },
  { position: "props", kind: "prop-set", model: "Tri-blade 5.1 in", lifeFlights: 8 },
  { position: "flight controller", kind: "flight-controller", model: "Flight controller 30×30 mm" },
  { position: "ESC", kind: "esc", model: "4-in-1 45 A" },
  { position: "camera", kind: "camera", model: "Micro camera 1.8 mm" },
  { position: "video transmitter", kind: "video-transmitter", model: "VTX 25–400 mW" },
  { position: "receiver", kind: "receiver", model: "2.4 GHz nano receiver" },
  { position: "antenna", kind: "antenna", model: "5.8 GHz circular-polarised antenna" },
];

async function main(): Promise<void> {
  if (!config().demo) {
    console.log(
      "seed: HEATCHECK_DEMO=0, no demo team (create the first owner with `npm run accounts -- first-owner`)",
    );
    return;
  }
  if ((await db.team.count()) > 0) {
    console.log("seed: the database already has a team; nothing to do");
    return;
  }
  const started = Date.now();
  const team = await db.team.create({ data: { name: DEMO_TEAM } });
  try {
    await seedTeam(team.id);
  } catch (e) {
    await undoSeed(team.id);
    throw e;
  }
  const logs = await db.flightLog.groupBy({ by: ["status"], _count: true });
  console.log(
    `seed: demo team created in ${((Date.now() - started) / 1000).toFixed(1)} s (${logs.map((l) => `${l._count} ${l.status}`).join(", ")} logs)`,
  );
}

/**
 * A failed seed leaves nothing behind — no half team that later starts would take for a seeded
 * database — so the next `npm start` simply tries again.
 */
async function undoSeed(teamId: string): Promise<void> {
  await analysesSettled().catch(() => undefined);
  const stored = await db.flightLog.findMany({ where: { teamId }, select: { storedPath: true } });
  for (const s of stored) await rm(s.storedPath, { force: true }).catch(() => undefined);
  await db.team.delete({ where: { id: teamId } });
  await db.user.deleteMany({
    where: { email: { in: DEMO_ACCOUNTS.map((a) => a.email) }, memberships: { none: {} } },
  });
}

async function seedTeam(teamId: string): Promise<void> {
  const team = { id: teamId };
  const users: Record<string, Actor> = {};
  for (const a of DEMO_ACCOUNTS) {
    const user = await db.user.create({
      data: { email: a.email, name: a.name, passwordHash: await hashPassword(a.password) },
    });
    await db.membership.create({ data: { userId: user.id, teamId: team.id, role: a.role } });
    users[a.role] = {
      teamId: team.id,
      role: a.role,
      userId: user.id,
      name: a.name,
      via: "session",
    };
  }
  const tech = users.tech as Actor;
  const pilot = users.pilot as Actor;
  const now = Date.now();
  const autumn = now - 21 * DAY;

  const tmp = await mkdtemp(join(tmpdir(), "heatcheck-seed-"));
  let seed = 500;
  async function upload(
    airframe: string,
    flownAt: number,
    options: Partial<DemoLogOptions>,
    note: string,
    airframeSeed: number,
  ) {
    const file = join(tmp, `${airframe}-${seed}.csv`);
    const csv = demoCsv(
      { seed: seed++, durationS: LOG_SECONDS, airframeSeed, ...options },
      { airframe, flownAt: new Date(flownAt).toISOString(), note },
    );
    await writeFile(file, csv);
    const r = await ingestLog(pilot, {
      fileName: `${airframe.toLowerCase()}-${new Date(flownAt).toISOString().slice(0, 10)}-${seed}.csv`,
      body: createReadStream(file),
    });
    return r.logId;
  }

  // Spares on the shelf
  await createParts(tech, {
    kind: "arm",
    model: "Harrow arm 6 mm",
    label: "spare-arm",
    supplier: "Vale Carbon Works",
    cost: 9,
    acquiredAt: new Date(autumn),
    lifeFlights: null,
    lifeMinutes: null,
    quantity: 3,
    notes: "",
  });
  await createParts(tech, {
    kind: "motor",
    model: "Stator 2207 1850 kv",
    label: "spare-motor",
    supplier: "Brackenford Spares",
    cost: 21,
    acquiredAt: new Date(autumn),
    lifeFlights: 60,
    lifeMinutes: null,
    quantity: 2,
    notes: "",
  });
  await createParts(tech, {
    kind: "prop-set",
    model: "Tri-blade 5.1 in",
    label: "props",
    supplier: "Brackenford Spares",
    cost: 3,
    acquiredAt: new Date(autumn),
    lifeFlights: 8,
    lifeMinutes: null,
    quantity: 6,
    notes: "",
  });
  await createParts(tech, {
    kind: "camera",
    model: "Micro camera 1.8 mm",
    label: "spare-cam",
    supplier: "Lenslane",
    cost: 28,
    acquiredAt: new Date(autumn),
    lifeFlights: null,
    lifeMinutes: null,
    quantity: 1,
    notes: "",
  });

  const names = Array.from({ length: 8 }, (_, i) => `HV-0${i + 1}`);
  // HV-04 has flown with a hairline crack in its rear-right arm since before its autumn baseline
  // (a hard landing nobody logged): its own baseline hides it, its sisters do not.
  const hv04SoftArm: Partial<DemoLogOptions> = {
    scenario: "cracked-arm",
    severity: 2,
    position: 3,
  };
  const history = (name: string): Partial<DemoLogOptions> => (name === "HV-04" ? hv04SoftArm : {});
  const ids: Record<string, string> = {};
  const notes: Record<string, string> = {
    "HV-08": "Practice quad; motors from last season.",
    "HV-09": "New build for the winter series; no baseline flown yet.",
  };
  // HV-09 is built from the same kit but has only flown practice and today's heat: no baseline.
  for (const [i, name] of [...names, "HV-09"].entries()) {
    const a = await createAirframe(tech, {
      name,
      frameDesign: FRAME,
      serial: `HVQ-2026-${String(101 + i)}`,
      notes: notes[name] ?? "",
    });
    ids[name] = a.id;
    for (const p of POSITIONS) {
      const [part] = await createParts(tech, {
        kind: p.kind,
        model: p.model,
        label: `${name}-${p.position.split(" ")[0]}`,
        supplier: "Vale Carbon Works",
        cost: null,
        acquiredAt: new Date(autumn - 10 * DAY),
        lifeFlights: p.lifeFlights ?? null,
        lifeMinutes: null,
        quantity: 1,
        notes: "",
      });
      if (part)
        await swapPart(tech, {
          airframeId: a.id,
          position: p.position,
          newPartId: part.id,
          reason: "initial build",
          removedStatus: "stock",
          at: new Date(autumn - 7 * DAY),
        });
    }
  }

  // Autumn event: every quad's known-good log, flown on the rebuilt frames.
  const autumnEvent = await createEvent(tech, {
    name: "Vale Autumn Open",
    venue: "Harrow Vale sports field",
    startsAt: new Date(autumn),
  });
  const goodLogs: Record<string, string> = {};
  for (const [i, name] of names.entries()) {
    goodLogs[name] = await upload(
      name,
      autumn + HOUR + i * 10 * 60_000,
      history(name),
      "known-good after the autumn rebuild",
      i,
    );
  }
  await createHeat(tech, {
    eventId: autumnEvent.id,
    name: "Final",
    startsAt: new Date(autumn + 5 * HOUR),
  });
  await analysesSettled();
  for (const name of names)
    await setBaseline(
      tech,
      ids[name] ?? "",
      [goodLogs[name] ?? ""],
      "known-good log after the autumn rebuild",
    );

  // HV-02: crashed in autumn, front-left arm replaced, inspected, new baseline.
  const hv02 = ids["HV-02"] ?? "";
  await logCrash(pilot, {
    airframeId: hv02,
    at: new Date(autumn + 6 * HOUR),
    heatId: null,
    severity: "hard",
    positions: ["arm front-left"],
    note: "clipped the gate post on lap 2",
    ground: true,
  });
  /** A spare arm from stock fitted in place of a crash-damaged one. */
  const fitSpareArm = async (label: string, position: string, reason: string, at: Date) => {
    const spare = await db.part.findFirst({ where: { teamId: team.id, label } });
    if (spare)
      await swapPart(tech, {
        airframeId: hv02,
        position,
        newPartId: spare.id,
        reason,
        removedStatus: "damaged",
        at,
      });
  };
  await fitSpareArm(
    "spare-arm-1",
    "arm front-left",
    "arm cracked at the motor mount in the gate-post crash",
    new Date(autumn + 7 * HOUR),
  );
  await recordInspection(tech, {
    airframeId: hv02,
    at: new Date(autumn + 8 * HOUR),
    findings:
      "New front-left arm fitted; other arms flexed, no cracks; screws torqued; props replaced.",
    checklist: [
      "props off and battery disconnected before starting",
      "every arm checked by eye and gently flexed for cracks and delamination",
      "frame and arm screws checked for tightness",
    ],
    returnToService: true,
  });
  const hv02check = await upload(
    "HV-02",
    autumn + 2 * DAY,
    { airframeSeed: 1 },
    "check hover after the arm swap",
    1,
  );
  await analysesSettled();
  await setBaseline(tech, hv02, [hv02check], "new front-left arm after the autumn crash");

  // Practice between the events: short 2 kHz logs (the logger was set lower), all healthy.
  for (const daysAgo of [12, 5]) {
    for (const [i, name] of names.entries()) {
      await upload(
        name,
        now - daysAgo * DAY + i * 5 * 60_000,
        { sampleRateHz: 2000, durationS: 20, ...history(name) },
        "practice session",
        i,
      );
    }
  }
  await upload(
    "HV-09",
    now - 5 * DAY + 45 * 60_000,
    { sampleRateHz: 2000, durationS: 20 },
    "first practice on the new build",
    8,
  );

  // Today: Winter Series round 1. Earlier heats flown; the next heat starts soon.
  const winter = await createEvent(tech, {
    name: "Winter Series round 1",
    venue: "Copse Lane indoor arena",
    startsAt: new Date(now - 4 * HOUR),
  });
  const heats = [];
  for (const [i, offset] of [-3, -1.5, 0.75, 2].entries()) {
    heats.push(
      await createHeat(tech, {
        eventId: winter.id,
        name: `Heat ${i + 1}`,
        startsAt: new Date(now + offset * HOUR),
      }),
    );
  }
  await setHeatEntries(
    tech,
    heats[0]?.id ?? "",
    [ids["HV-01"], ids["HV-02"], ids["HV-03"], ids["HV-04"]].map(String),
  );
  await setHeatEntries(
    tech,
    heats[1]?.id ?? "",
    [ids["HV-05"], ids["HV-06"], ids["HV-07"], ids["HV-08"]].map(String),
  );
  await setHeatEntries(
    tech,
    heats[2]?.id ?? "",
    [ids["HV-01"], ids["HV-03"], ids["HV-05"], ids["HV-07"], ids["HV-09"]].map(String),
  );
  await setHeatEntries(
    tech,
    heats[3]?.id ?? "",
    [ids["HV-02"], ids["HV-04"], ids["HV-06"], ids["HV-08"]].map(String),
  );

  const today: { name: string; options: Partial<DemoLogOptions>; note: string; heat: number }[] = [
    { name: "HV-01", options: {}, note: "heat 1", heat: 0 },
    { name: "HV-02", options: { style: "hard" }, note: "heat 1, pushed hard all race", heat: 0 },
    {
      name: "HV-03",
      options: { scenario: "cracked-arm", severity: 2, position: 2 },
      note: "heat 1, felt soft on pitch",
      heat: 0,
    },
    { name: "HV-04", options: hv04SoftArm, note: "heat 1", heat: 0 },
    {
      name: "HV-05",
      options: { scenario: "bent-prop", severity: 2, position: 3 },
      note: "heat 2, touched a flag",
      heat: 1,
    },
    {
      name: "HV-06",
      options: { scenario: "worn-bearing", severity: 3, position: 1 },
      note: "heat 2, grinding noise on landing",
      heat: 1,
    },
    { name: "HV-07", options: {}, note: "heat 2, before the crash", heat: 1 },
    { name: "HV-08", options: {}, note: "heat 2", heat: 1 },
    { name: "HV-09", options: {}, note: "heat 2, first race on the new build", heat: 1 },
  ];
  for (const [i, t] of today.entries()) {
    const heatStart = now + (t.heat === 0 ? -3 : -1.5) * HOUR;
    await upload(t.name, heatStart + 5 * 60_000 + i * 60_000, t.options, t.note, i);
  }
  // HV-02 clipped a flag in heat 1: rear-right arm replaced between heats and inspected; it flies
  // heat 4 on a baseline that no longer describes it.
  await logCrash(pilot, {
    airframeId: hv02,
    at: new Date(now - 2.6 * HOUR),
    heatId: heats[0]?.id ?? null,
    severity: "minor",
    positions: ["arm rear-right"],
    note: "clipped the flag pole, arm split at the motor mount",
    ground: false,
  });
  await fitSpareArm(
    "spare-arm-2",
    "arm rear-right",
    "arm split in the heat 1 flag strike",
    new Date(now - 2.3 * HOUR),
  );
  await recordInspection(tech, {
    airframeId: hv02,
    at: new Date(now - 2.1 * HOUR),
    findings: "Rear-right arm replaced; the other arms flexed, no cracks; props replaced.",
    checklist: [
      "props off and battery disconnected before starting",
      "every arm checked by eye and gently flexed for cracks and delamination",
      "frame and arm screws checked for tightness",
    ],
    returnToService: true,
  });
  await logCrash(pilot, {
    airframeId: ids["HV-07"] ?? "",
    at: new Date(now - 1.4 * HOUR),
    heatId: heats[1]?.id ?? null,
    severity: "hard",
    positions: ["arm rear-left", "props"],
    note: "cartwheeled off the dive gate",
    ground: true,
  });

  // HV-08 flies old motors: push motor 4 past its life with the practice flights it has done.
  const hv08motor = await db.installation.findFirst({
    where: { airframeId: ids["HV-08"], position: "motor 4 (rear-left)", toAt: null },
    include: { part: true },
  });
  if (hv08motor)
    await db.part.update({
      where: { id: hv08motor.partId },
      data: { lifeFlights: 2, notes: "last season's motor, kept for practice" },
    });

  await analysesSettled();
  await rm(tmp, { recursive: true, force: true });
  const failed = await db.flightLog.findMany({
    where: { teamId, status: { not: "analysed" } },
    select: { fileName: true, error: true },
  });
  if (failed.length > 0) {
    throw new Error(
      `${failed.length} demo logs could not be analysed (first: ${failed[0]?.fileName}: ${failed[0]?.error ?? "no result"})`,
    );
  }
}

main()
  .then(async () => {
    await db.$disconnect();
    process.exit(0);
  })
  .catch(async (e: unknown) => {
    console.error("seed failed:", e instanceof Error ? e.message : e);
    await db.$disconnect();
    process.exit(1);
  });
