import "server-only";
import { config } from "@/lib/config";
import { DEMO_ACCOUNTS } from "@/lib/demo/accounts";
import { db } from "./db";

/**
 * The invented demo team's accounts (lib/demo/accounts.ts). Their passwords are published (README,
 * sign-in page in demo mode), so while any of them exists every screen says this is a demo.
 */
const DEMO_EMAILS = DEMO_ACCOUNTS.map((a) => a.email);

/** Demo mode is on unless HEATCHECK_DEMO=0 (a shared server): it seeds and shows demo sign-ins. */
export function demoMode(): boolean {
  return config().demo;
}

export async function demoAccountsExist(): Promise<boolean> {
  return (await db.user.count({ where: { email: { in: DEMO_EMAILS }, disabledAt: null } })) > 0;
}
