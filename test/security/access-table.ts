import { roleAtLeast, type Role } from "@/lib/roles";

/**
 * THE access table: who may reach each page, route handler and server action. The security
 * suite checks every entry of the build's own manifest against it (an entry missing here fails
 * the suite), and the README's roles section is this table rendered by `accessTableMarkdown()`
 * (the suite checks that too). Change the app's access rules here first.
 *
 * minimum: "public" needs nothing; "signed-in" any signed-in person, team or not; a role: a
 * member of the active team with at least that role. token: a team's API token (which acts as a
 * pilot) may call it. teamResource: it names one record of a team in its address, so another
 * team's members are answered "not found".
 */
export interface AccessRule {
  minimum: Role | "public" | "signed-in";
  token: boolean;
  teamResource?: boolean;
  what: string;
}

export const PAGES: Record<string, AccessRule> = {
  "/signin": { minimum: "public", token: false, what: "sign-in screen" },
  "/": { minimum: "viewer", token: false, what: "inspection queue" },
  "/fleet": { minimum: "viewer", token: false, what: "fleet" },
  "/airframes/[id]": {
    minimum: "viewer",
    token: false,
    teamResource: true,
    what: "airframe screen",
  },
  "/logs/[id]": { minimum: "viewer", token: false, teamResource: true, what: "log screen" },
  "/upload": { minimum: "viewer", token: false, what: "upload screen (uploading needs pilot)" },
  "/parts": { minimum: "viewer", token: false, what: "parts" },
  "/events": { minimum: "viewer", token: false, what: "events and heats" },
  "/team": {
    minimum: "viewer",
    token: false,
    what: "team screen (members and tokens shown to owners)",
  },
  "/welcome": { minimum: "signed-in", token: false, what: "invitations for a person in no team" },
};

/** Route handlers as "METHOD path" (the path as in the build manifest). */
export const ROUTES: Record<string, AccessRule> = {
  "GET /api/auth/[...nextauth]": {
    minimum: "public",
    token: false,
    what: "sign-in machinery (next-auth)",
  },
  "GET /api/v1/queue": { minimum: "viewer", token: true, what: "API: inspection queue" },
  "GET /api/v1/airframes/[name]": {
    minimum: "viewer",
    token: true,
    teamResource: true,
    what: "API: one airframe's record",
  },
  "GET /api/v1/airframes/[name]/history": {
    minimum: "viewer",
    token: true,
    teamResource: true,
    what: "API: one airframe's history export",
  },
  "POST /api/v1/logs": { minimum: "pilot", token: true, what: "API: upload a log" },
  "GET /api/v1/logs/[id]": {
    minimum: "viewer",
    token: true,
    teamResource: true,
    what: "API: one log's status",
  },
};

/** Server actions by exported name. */
export const ACTIONS: Record<string, AccessRule> = {
  createAirframeAction: { minimum: "tech", token: false, what: "add an airframe" },
  setAirframeStateAction: { minimum: "tech", token: false, what: "ground / return to service" },
  retireAirframeAction: { minimum: "tech", token: false, what: "retire an airframe" },
  logCrashAction: { minimum: "pilot", token: false, what: "log a crash" },
  swapPartAction: { minimum: "tech", token: false, what: "swap a part" },
  recordInspectionAction: { minimum: "tech", token: false, what: "record an inspection" },
  setBaselineAction: { minimum: "tech", token: false, what: "set the baseline" },
  reanalyseAction: { minimum: "tech", token: false, what: "re-run an analysis" },
  addPartsAction: { minimum: "tech", token: false, what: "add parts to stock" },
  setPartStatusAction: { minimum: "tech", token: false, what: "mark a part damaged / scrapped" },
  createEventAction: { minimum: "tech", token: false, what: "add an event" },
  createHeatAction: { minimum: "tech", token: false, what: "add a heat" },
  setHeatEntriesAction: { minimum: "tech", token: false, what: "choose a heat's airframes" },
  saveProfileAction: { minimum: "pilot", token: false, what: "save an import profile" },
  inviteMemberAction: { minimum: "owner", token: false, what: "invite a member" },
  withdrawInvitationAction: { minimum: "owner", token: false, what: "withdraw an invitation" },
  removeMemberAction: { minimum: "owner", token: false, what: "remove a member (or leave)" },
  changeRoleAction: { minimum: "owner", token: false, what: "change a member's role" },
  createTokenAction: { minimum: "owner", token: false, what: "create an API token" },
  revokeTokenAction: { minimum: "owner", token: false, what: "revoke an API token" },
  confirmTokenAction: { minimum: "owner", token: false, what: "confirm a paused API token" },
  changePasswordAction: { minimum: "viewer", token: false, what: "change your own password" },
  switchTeamAction: { minimum: "viewer", token: false, what: "switch team" },
  answerInvitationAction: {
    minimum: "signed-in",
    token: false,
    what: "accept / decline an invitation",
  },
};

export const PRINCIPALS = [
  "anonymous",
  "garbage token",
  "revoked token",
  "valid token",
  "other team's owner",
  "viewer",
  "pilot",
  "tech",
  "owner",
] as const;
export type Principal = (typeof PRINCIPALS)[number];

/** Whether the principal may use the entry, for the team whose records the suite addresses. */
export function expectedAllowed(rule: AccessRule, who: Principal): boolean {
  if (rule.minimum === "public") return true;
  switch (who) {
    case "anonymous":
    case "garbage token":
    case "revoked token":
      return false;
    case "valid token":
      return rule.token && (rule.minimum === "signed-in" || roleAtLeast("pilot", rule.minimum));
    case "other team's owner":
      return !rule.teamResource;
    default:
      return rule.minimum === "signed-in" || roleAtLeast(who, rule.minimum);
  }
}

/** The README's roles table, generated from the rules above. */
export function accessTableMarkdown(): string {
  const cols: { label: string; who: Principal }[] = [
    { label: "viewer", who: "viewer" },
    { label: "pilot", who: "pilot" },
    { label: "tech", who: "tech" },
    { label: "owner", who: "owner" },
    { label: "API token", who: "valid token" },
  ];
  const rows = [
    ...Object.values(PAGES).filter((r) => r.minimum !== "public"),
    ...Object.values(ROUTES).filter((r) => r.minimum !== "public"),
    ...Object.values(ACTIONS),
  ];
  const lines = [
    `| what | ${cols.map((c) => c.label).join(" | ")} |`,
    `|---|${cols.map(() => "---").join("|")}|`,
  ];
  for (const r of rows)
    lines.push(
      `| ${r.what} | ${cols.map((c) => (expectedAllowed(r, c.who) ? "yes" : "–")).join(" | ")} |`,
    );
  return lines.join("\n");
}
