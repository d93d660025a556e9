// Accounts for the server operator, from a terminal on the server (no web page can do these):
//   npm run accounts -- first-owner <email> "<name>" "<team name>"   the first team and its owner
//   npm run accounts -- disable <email>                               no sign-in, every session ends
//   npm run accounts -- enable <email>
// The first owner's password is read from HEATCHECK_OWNER_PASSWORD, or asked for on the terminal.
import { createInterface } from "node:readline/promises";
import { config } from "@/lib/config";
import { isDomainError } from "@/lib/errors";
import { db } from "@/lib/server/db";
import { assertAcceptablePassword, hashPassword } from "@/lib/server/passwords";
import { endUserSessions } from "@/lib/server/sessions";

async function askPassword(): Promise<string> {
  const fromEnv = config().ownerPassword;
  if (fromEnv) return fromEnv;
  const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
  const answer = await rl.question("Password for the first owner (12+ characters): ");
  rl.close();
  return answer;
}

async function firstOwner(email: string, name: string, teamName: string): Promise<void> {
  if ((await db.user.count()) > 0)
    throw new Error(
      "This server already has accounts: owners invite the next people from the Team screen.",
    );
  const password = await askPassword();
  await assertAcceptablePassword(password, { email, field: "password" });
  const passwordHash = await hashPassword(password);
  await db.$transaction(async (tx) => {
    const team = await tx.team.create({ data: { name: teamName } });
    const user = await tx.user.create({ data: { email: email.toLowerCase(), name, passwordHash } });
    await tx.membership.create({ data: { userId: user.id, teamId: team.id, role: "owner" } });
    await tx.auditEntry.create({
      data: {
        teamId: team.id,
        userId: null,
        userName: "server operator",
        action: "first owner",
        entity: "user",
        entityId: user.id,
        detail: name,
      },
    });
  });
  console.log(
    `${email} is the owner of "${teamName}". Sign in and invite the rest of the team from the Team screen.`,
  );
}

async function setDisabled(email: string, disabled: boolean): Promise<void> {
  const user = await db.user.findUnique({ where: { email: email.toLowerCase() } });
  if (!user) throw new Error(`No account has the email ${email}.`);
  await db.user.update({
    where: { id: user.id },
    data: { disabledAt: disabled ? new Date() : null },
  });
  const ended = disabled ? await endUserSessions(user.id, "account disabled") : 0;
  console.log(
    disabled
      ? `${email} is disabled; ${ended} open session(s) ended.`
      : `${email} may sign in again.`,
  );
}

async function main(): Promise<number> {
  const [command, ...args] = process.argv.slice(2);
  if (command === "first-owner" && args.length === 3)
    await firstOwner(args[0] ?? "", args[1] ?? "", args[2] ?? "");
  else if ((command === "disable" || command === "enable") && args.length === 1)
    await setDisabled(args[0] ?? "", command === "disable");
  else {
    console.error(
      'usage: npm run accounts -- first-owner <email> "<name>" "<team name>" | disable <email> | enable <email>',
    );
    return 2;
  }
  return 0;
}

main()
  .then((code) => process.exit(code))
  .catch((e: unknown) => {
    console.error(`accounts: ${isDomainError(e) || e instanceof Error ? e.message : String(e)}`);
    process.exit(1);
  });
