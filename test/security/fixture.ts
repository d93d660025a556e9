import { demoCsv } from "@/lib/demo/demo-csv";
import type { Actor, Role } from "@/lib/roles";
import { startApp, type AppServer } from "../support/app-server";
import { join } from "node:path";
import { type Client, signedIn } from "./http";

/**
 * The built app on a free loopback port with HEATCHECK_DEMO=0 (no demo team), and two invented
 * teams written into its database through the app's own services: "Alpha" with an owner, a tech,
 * a pilot and a viewer, an airframe, parts, an event, a live and a revoked API token and one
 * uploaded log; "Bravo" with its own owner and airframe. Names carry markers so that any answer
 * holding the other team's data can be found.
 */
export const ALPHA = {
  team: "Alpha Marker Team",
  airframe: "AL-SECRET-1",
  part: "alpha-only-part-model",
  event: "alpha-only-event",
};
export const BRAVO = {
  team: "Bravo Marker Team",
  airframe: "BR-OWN-1",
  part: "bravo-only-part-model",
};
export const password = (who: string) => `${who}-pass-for-tests-2026`;
export const ROLES_IN_ORDER: Role[] = ["viewer", "pilot", "tech", "owner"];

export interface Fixture {
  app: AppServer;
  alpha: Record<Role, Actor> & {
    teamId: string;
    airframeId: string;
    partId: string;
    logId: string;
    token: string;
    revokedToken: string;
  };
  bravo: { owner: Actor; teamId: string; airframeId: string };
  emails: { alpha: Record<Role, string>; bravoOwner: string };
  sessions: Record<Role, Client> & { bravoOwner: Client };
  services: Awaited<ReturnType<typeof loadServices>>;
}

async function loadServices() {
  return {
    db: (await import("@/lib/server/db")).db,
    ...(await import("@/lib/server/airframes")),
    ...(await import("@/lib/server/parts")),
    ...(await import("@/lib/server/events")),
    ...(await import("@/lib/server/crashes")),
    ...(await import("@/lib/server/team")),
    hashPassword: (await import("@/lib/server/passwords")).hashPassword,
  };
}

export async function startWithTwoTeams(label: string): Promise<Fixture> {
  // Through `npm start` (scripts/start.ts), which reuses a fresh build, with the demo off.
  const app = await startApp({ env: { HEATCHECK_DEMO: "0" } });
  // The test process writes into the app's own SQLite file through the same services.
  process.env.DATABASE_URL = `file:${join(app.dataDir, "heatcheck.db")}`;
  process.env.HEATCHECK_DATA_DIR = app.dataDir;
  process.env.HEATCHECK_WORKERS = "0";
  const s = await loadServices();

  async function team(name: string, roles: Role[], prefix: string) {
    const t = await s.db.team.create({ data: { name } });
    const actors = {} as Record<Role, Actor>;
    const emails = {} as Record<Role, string>;
    for (const role of roles) {
      const email = `${prefix}-${role}-${label}@example.test`;
      const user = await s.db.user.create({
        data: {
          email,
          name: `${prefix} ${role} person`,
          passwordHash: await s.hashPassword(password(`${prefix}-${role}`)),
        },
      });
      await s.db.membership.create({ data: { userId: user.id, teamId: t.id, role } });
      actors[role] = { teamId: t.id, role, userId: user.id, name: user.name, via: "session" };
      emails[role] = email;
    }
    return { teamId: t.id, actors, emails };
  }
  const a = await team(ALPHA.team, ROLES_IN_ORDER, "alpha");
  const b = await team(BRAVO.team, ["owner"], "bravo");
  const aTech = a.actors.tech;
  const bOwner = b.actors.owner;
  const af = await s.createAirframe(aTech, {
    name: ALPHA.airframe,
    frameDesign: "alpha frame",
    serial: "",
    notes: "",
  });
  const bf = await s.createAirframe(bOwner, {
    name: BRAVO.airframe,
    frameDesign: "bravo frame",
    serial: "",
    notes: "",
  });
  const [part] = await s.createParts(aTech, {
    kind: "arm",
    model: ALPHA.part,
    label: "",
    supplier: "",
    cost: null,
    acquiredAt: null,
    lifeFlights: null,
    lifeMinutes: null,
    notes: "",
    quantity: 1,
  });
  await s.createParts(bOwner, {
    kind: "arm",
    model: BRAVO.part,
    label: "",
    supplier: "",
    cost: null,
    acquiredAt: null,
    lifeFlights: null,
    lifeMinutes: null,
    notes: "",
    quantity: 1,
  });
  await s.createEvent(aTech, { name: ALPHA.event, venue: "", startsAt: new Date() });
  const { token } = await s.createToken(a.actors.owner, "alpha field laptop");
  const revoked = await s.createToken(a.actors.owner, "alpha old laptop");
  await s.revokeToken(a.actors.owner, revoked.id);

  // One log, uploaded over HTTP with the token, so the app analyses it as it would any upload.
  const csv = demoCsv(
    { seed: 7, durationS: 4, airframeSeed: 3 },
    { airframe: ALPHA.airframe, flownAt: "2026-11-20T10:00:00Z", note: "alpha log" },
  );
  const form = new FormData();
  form.set("airframe", ALPHA.airframe);
  form.set("file", new Blob([csv]), "alpha-first.csv");
  const up = await fetch(`${app.url}/api/v1/logs`, {
    method: "POST",
    headers: { authorization: `Bearer ${token}` },
    body: form,
  });
  if (up.status !== 200) throw new Error(`fixture upload failed: ${up.status} ${await up.text()}`);
  const { logId } = (await up.json()) as { logId: string };

  const sessions = {} as Record<Role, Client> & { bravoOwner: Client };
  for (const role of ROLES_IN_ORDER)
    sessions[role] = await signedIn(app.url, a.emails[role], password(`alpha-${role}`));
  sessions.bravoOwner = await signedIn(app.url, b.emails.owner, password("bravo-owner"));
  return {
    app,
    alpha: {
      ...a.actors,
      teamId: a.teamId,
      airframeId: af.id,
      partId: part?.id ?? "",
      logId,
      token,
      revokedToken: revoked.token,
    },
    bravo: { owner: bOwner, teamId: b.teamId, airframeId: bf.id },
    emails: { alpha: a.emails, bravoOwner: b.emails.owner },
    sessions,
    services: s,
  };
}
