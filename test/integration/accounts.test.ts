import { execFileSync } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import {
  ConflictError,
  ForbiddenError,
  InputError,
  NotFoundError,
  UnauthenticatedError,
} from "@/lib/errors";
import type { Actor, Role } from "@/lib/roles";
import { freshDatabase } from "../support/test-db";

// Accounts, sessions, invitations, members and tokens on a real SQLite file, no mocks. The
// rules come from OWASP ASVS 4.0 (V2 authentication, V3 sessions) and issue 7 of this project.
freshDatabase("accounts");
const { db } = await import("@/lib/server/db");
const { actorForUser, requireToken } = await import("@/lib/server/guard");
const { changePassword, myInvitations, answerInvitation } = await import("@/lib/server/account");
const {
  inviteMember,
  invitationMessage,
  removeMember,
  changeRole,
  createToken,
  confirmToken,
  listTokens,
  recentAudit,
} = await import("@/lib/server/team");
const { assertAcceptablePassword, hashPassword, passwordMatches } =
  await import("@/lib/server/passwords");
const { startSession, assertSessionOpen, SESSION_IDLE_MS, SESSION_ABSOLUTE_MS } =
  await import("@/lib/server/sessions");
const throttle = await import("@/lib/server/sign-in-throttle");

async function makeTeam(name: string): Promise<Record<Role, Actor>> {
  const team = await db.team.create({ data: { name } });
  const out = {} as Record<Role, Actor>;
  for (const role of ["owner", "tech", "pilot", "viewer"] as const) {
    const user = await db.user.create({
      data: {
        email: `${role}@${team.id}.test`,
        name: `${name} ${role}`,
        passwordHash: await hashPassword(`${role}-long-enough-pass`),
      },
    });
    await db.membership.create({ data: { userId: user.id, teamId: team.id, role } });
    out[role] = await actorForUser(user.id, team.id, "viewer");
  }
  return out;
}

let a: Record<Role, Actor>;
let b: Record<Role, Actor>;
beforeAll(async () => {
  a = await makeTeam("Alpha");
  b = await makeTeam("Bravo");
});

describe("password rules (ASVS 4.0 §2.1.1, §2.1.7; bcrypt's 72-byte input limit)", () => {
  const ctx = { email: "rider@example.test", field: "password" };
  it("refuses short, whitespace-only, common and email passwords with a sentence naming the field", async () => {
    // 11 characters: one under the 12-character minimum of ASVS §2.1.1.
    await expect(assertAcceptablePassword("abcdefghijk", ctx)).rejects.toThrow(/at least 12/);
    await expect(assertAcceptablePassword("              ", ctx)).rejects.toThrow(/spaces/);
    // On the shipped list (SecLists top-1M, lib/server/data/README.md), matched case-insensitively.
    await expect(assertAcceptablePassword("QWERTY123456", ctx)).rejects.toThrow(/common/);
    await expect(assertAcceptablePassword("1qaz2wsx3edc", ctx)).rejects.toThrow(/common/);
    await expect(assertAcceptablePassword("rider@example.test", ctx)).rejects.toThrow(/email/);
    await expect(assertAcceptablePassword("gravel-pit-lantern-9", ctx)).resolves.toBeUndefined();
  });

  it("refuses more than 72 bytes instead of truncating; a long password never signs in by its first 72", async () => {
    const long = "x".repeat(72);
    await expect(assertAcceptablePassword(`${long}y`, ctx)).rejects.toThrow(/72 bytes/);
    // 24 three-byte characters are 72 bytes: accepted; one more is refused although it is 25 characters.
    await expect(assertAcceptablePassword("€".repeat(24), ctx)).resolves.toBeUndefined();
    await expect(assertAcceptablePassword("€".repeat(25), ctx)).rejects.toThrow(/72 bytes/);
    const hash = await hashPassword(long);
    expect(await passwordMatches(long, hash)).toBe(true);
    // bcryptjs alone would say true here (it reads 72 bytes): the check refuses the longer input.
    expect(await passwordMatches(`${long}anything`, hash)).toBe(false);
  });

  it("a password change refuses the current password and the rules, and changes nothing then", async () => {
    const before = (await db.user.findUnique({ where: { id: a.pilot.userId ?? "" } }))
      ?.passwordHash;
    await expect(
      changePassword(a.pilot, "pilot-long-enough-pass", "pilot-long-enough-pass"),
    ).rejects.toThrow(/current one/);
    await expect(
      changePassword(a.pilot, "pilot-long-enough-pass", "password1234"),
    ).rejects.toBeInstanceOf(InputError);
    expect((await db.user.findUnique({ where: { id: a.pilot.userId ?? "" } }))?.passwordHash).toBe(
      before,
    );
  });
});

describe("sessions (ASVS 4.0 §3.3)", () => {
  it("a password change ends the user's other sessions and keeps the current one", async () => {
    const uid = a.tech.userId ?? "";
    const current = await startSession(uid);
    const other = await startSession(uid);
    const r = await changePassword(
      { ...a.tech, sessionId: current },
      "tech-long-enough-pass",
      "tech-new-long-pass-2",
    );
    expect(r.endedSessions).toBe(1);
    await expect(assertSessionOpen(other, uid)).rejects.toBeInstanceOf(UnauthenticatedError);
    await expect(assertSessionOpen(current, uid)).resolves.toBeUndefined();
  });

  it("ends after the idle and the absolute lifetime, and a session id works only for its own user", async () => {
    const uid = a.viewer.userId ?? "";
    const s1 = await startSession(uid);
    const t0 = Date.now();
    await expect(assertSessionOpen(s1, a.pilot.userId ?? "")).rejects.toBeInstanceOf(
      UnauthenticatedError,
    );
    // Seen again just inside the idle limit: still open, and the check moves lastSeenAt forward.
    await expect(
      assertSessionOpen(s1, uid, new Date(t0 + SESSION_IDLE_MS - 60_000)),
    ).resolves.toBeUndefined();
    await expect(
      assertSessionOpen(s1, uid, new Date(t0 + 2 * SESSION_IDLE_MS - 120_000)),
    ).resolves.toBeUndefined();
    const s2 = await startSession(uid);
    await expect(
      assertSessionOpen(s2, uid, new Date(Date.now() + SESSION_IDLE_MS + 1000)),
    ).rejects.toBeInstanceOf(UnauthenticatedError);
    // Kept busy, a session still ends at the absolute lifetime.
    const s3 = await startSession(uid);
    const start = Date.now();
    for (let t = start + 3600_000; t < start + SESSION_ABSOLUTE_MS; t += 3600_000)
      await assertSessionOpen(s3, uid, new Date(t));
    await expect(
      assertSessionOpen(s3, uid, new Date(start + SESSION_ABSOLUTE_MS + 1000)),
    ).rejects.toBeInstanceOf(UnauthenticatedError);
  });
});

describe("sign-in throttling (ASVS 4.0 §2.2.1)", () => {
  it("grows the wait after the free attempts, caps an account's wait at 30 s, and forgets after success", () => {
    const key = `account:test-${Math.random()}`;
    const t = 1_000_000;
    for (let i = 0; i < throttle.ACCOUNT_RULE.free; i++) throttle.recordFailure(key, t);
    expect(throttle.waitMs(key, throttle.ACCOUNT_RULE, t)).toBe(1000);
    throttle.recordFailure(key, t);
    expect(throttle.waitMs(key, throttle.ACCOUNT_RULE, t)).toBe(2000);
    for (let i = 0; i < 20; i++) throttle.recordFailure(key, t);
    expect(throttle.waitMs(key, throttle.ACCOUNT_RULE, t)).toBe(30_000);
    expect(throttle.waitMs(key, throttle.ADDRESS_RULE, t)).toBe(2 ** 6 * 1000);
    expect(throttle.throttleMessage(30_000)).toBe(
      "Too many sign-in attempts: wait 30 seconds, then try again.",
    );
    throttle.clearFailures(key);
    expect(throttle.waitMs(key, throttle.ACCOUNT_RULE, t)).toBe(0);
  });
});

describe("invitations (issue 7 item 6)", () => {
  it("answers the same whether or not the email has an account, and adds nobody until they accept", async () => {
    const existing = b.pilot;
    const existingEmail =
      (await db.user.findUnique({ where: { id: existing.userId ?? "" } }))?.email ?? "";
    const unknownEmail = "newcomer@example.test";
    const m1 = await inviteMember(a.owner, {
      email: existingEmail,
      name: "Whatever Name",
      role: "owner",
      password: "gravel-pit-lantern-9",
    });
    const m2 = await inviteMember(a.owner, {
      email: unknownEmail,
      name: "New Comer",
      role: "pilot",
      password: "gravel-pit-lantern-9",
    });
    expect(m1).toBe(invitationMessage(existingEmail, "owner"));
    expect(m2).toBe(invitationMessage(unknownEmail, "pilot"));
    expect(m1).not.toContain("Bravo pilot");
    // The existing account keeps its own name and password, and is in no new team yet.
    const u = await db.user.findUnique({ where: { id: existing.userId ?? "" } });
    expect(u?.name).toBe("Bravo pilot");
    expect(await passwordMatches("pilot-long-enough-pass", u?.passwordHash ?? "")).toBe(true);
    expect(
      await db.membership.count({
        where: { userId: existing.userId ?? "", teamId: a.owner.teamId },
      }),
    ).toBe(0);
    await expect(
      inviteMember(a.owner, {
        email: existingEmail,
        name: "x",
        role: "viewer",
        password: "gravel-pit-lantern-9",
      }),
    ).rejects.toBeInstanceOf(ConflictError);
    // Accepting joins with the invited role; another person cannot answer it.
    const [inv] = await myInvitations(existing.userId ?? "");
    await expect(
      answerInvitation(b.viewer.userId ?? "", inv?.id ?? "", true),
    ).rejects.toBeInstanceOf(NotFoundError);
    await answerInvitation(existing.userId ?? "", inv?.id ?? "", false);
    expect(
      await db.membership.count({
        where: { userId: existing.userId ?? "", teamId: a.owner.teamId },
      }),
    ).toBe(0);
    const newcomer = await db.user.findUnique({ where: { email: unknownEmail } });
    const [inv2] = await myInvitations(newcomer?.id ?? "");
    await answerInvitation(newcomer?.id ?? "", inv2?.id ?? "", true);
    expect((await actorForUser(newcomer?.id ?? "", a.owner.teamId, "viewer")).role).toBe("pilot");
  });
});

describe("members and tokens (issue 7 item 7)", () => {
  it("the last owner cannot leave; a removed member's sessions end; a removed owner's tokens pause until another owner confirms", async () => {
    const team = await makeTeam("Charlie");
    const own = await db.membership.findFirstOrThrow({
      where: { userId: team.owner.userId ?? "", teamId: team.owner.teamId },
    });
    await expect(removeMember(team.owner, own.id)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(changeRole(team.owner, own.id, "tech")).rejects.toBeInstanceOf(ForbiddenError);
    // A second owner who creates a token, then is removed.
    const second = await db.membership.findFirstOrThrow({
      where: { userId: team.tech.userId ?? "", teamId: team.owner.teamId },
    });
    await changeRole(team.owner, second.id, "owner");
    const secondActor = await actorForUser(team.tech.userId ?? "", team.owner.teamId, "owner");
    const { token, id } = await createToken(secondActor, "their laptop");
    const listed = (await listTokens(team.owner)).find((t) => t.id === id);
    expect(listed?.createdByName).toBe("Charlie tech");
    const s = await startSession(team.tech.userId ?? "");
    const r = await removeMember(team.owner, second.id);
    expect(r.pausedTokens).toBe(1);
    await expect(assertSessionOpen(s, team.tech.userId ?? "")).rejects.toBeInstanceOf(
      UnauthenticatedError,
    );
    const request = new Request("http://x/api/v1/queue", {
      headers: { authorization: `Bearer ${token}` },
    });
    await expect(requireToken(request)).rejects.toThrow(/paused/);
    await confirmToken(team.owner, id);
    await expect(requireToken(request)).resolves.toMatchObject({
      teamId: team.owner.teamId,
      via: "token",
    });
    // Another team's owner can neither remove this team's members nor confirm its tokens.
    const pilot = await db.membership.findFirstOrThrow({
      where: { userId: team.pilot.userId ?? "", teamId: team.owner.teamId },
    });
    await expect(removeMember(a.owner, pilot.id)).rejects.toBeInstanceOf(NotFoundError);
    await expect(confirmToken(a.owner, id)).rejects.toBeInstanceOf(NotFoundError);
  });

  it("recent changes show viewers names, never emails", async () => {
    const forViewer = await recentAudit(a.viewer);
    const forOwner = await recentAudit(a.owner);
    expect(forOwner.some((e) => e.detail.includes("@"))).toBe(true);
    expect(forViewer.length).toBe(forOwner.length);
    expect(forViewer.every((e) => !e.detail.includes("@") && !e.userName.includes("@"))).toBe(true);
    // The newcomer accepted and is a member, so their email reads as their name.
    expect(forViewer.some((e) => e.detail.includes("New Comer"))).toBe(true);
  });
});

describe("the first owner of a server without the demo (npm run accounts -- first-owner)", () => {
  it("creates the team and its owner once, with a password that passes the rules, and refuses a second time", () => {
    // An empty server of its own: migrated, no accounts.
    const url = `file:${join(mkdtempSync(join(tmpdir(), "heatcheck-owner-")), "h.db")}`;
    execFileSync("npx", ["prisma", "migrate", "deploy"], {
      env: { ...process.env, DATABASE_URL: url },
      stdio: "pipe",
    });
    const run = (pw: string) =>
      execFileSync(
        "npx",
        [
          "tsx",
          "--conditions=react-server",
          "scripts/accounts.ts",
          "first-owner",
          "lead@club.example.test",
          "Lead Person",
          "Club Team",
        ],
        {
          env: { ...process.env, DATABASE_URL: url, HEATCHECK_OWNER_PASSWORD: pw },
          encoding: "utf8",
          stdio: "pipe",
        },
      );
    expect(() => run("password1234")).toThrow(/common passwords/);
    expect(run("gravel-pit-lantern-9")).toMatch(/is the owner of "Club Team"/);
    expect(() => run("gravel-pit-lantern-10")).toThrow(/already has accounts/);
  }, 60_000);
});
