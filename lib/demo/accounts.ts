/**
 * The invented demo club's sign-in accounts: one source for the seed, the start script's banner and
 * the tests. These passwords are published in the README, so they belong on a pit laptop's demo only.
 */
export const DEMO_ACCOUNTS = [
  {
    email: "owner@heatcheck.test",
    name: "Mara Quill",
    role: "owner",
    password: "pitwall-owner-2026",
  },
  {
    email: "tech@heatcheck.test",
    name: "Jonas Ferrow",
    role: "tech",
    password: "pitwall-tech-2026",
  },
  {
    email: "pilot@heatcheck.test",
    name: "Edda Lorne",
    role: "pilot",
    password: "pitwall-pilot-2026",
  },
  {
    email: "viewer@heatcheck.test",
    name: "Pit screen",
    role: "viewer",
    password: "pitwall-viewer-2026",
  },
] as const;

export type DemoRole = (typeof DEMO_ACCOUNTS)[number]["role"];

export function demoAccount(role: DemoRole): (typeof DEMO_ACCOUNTS)[number] {
  const account = DEMO_ACCOUNTS.find((a) => a.role === role);
  if (!account) throw new Error(`no demo account for role ${role}`);
  return account;
}
