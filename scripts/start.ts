// npm start: everything a fresh clone needs to come up on http://localhost:3000 — the SQLite
// database created and migrated, the demo team seeded when it is empty, the app built when its
// sources changed — then `next start`. Settings come from the environment (see README).
import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";

const root = process.cwd();
const dataDir = resolve(process.env.HEATCHECK_DATA_DIR ?? join(root, "data"));
mkdirSync(dataDir, { recursive: true });
const port = process.env.PORT ?? "3000";
const env: NodeJS.ProcessEnv = {
  ...process.env,
  NEXT_TELEMETRY_DISABLED: "1",
  HEATCHECK_DATA_DIR: dataDir,
  DATABASE_URL: process.env.DATABASE_URL ?? `file:${join(dataDir, "heatcheck.db")}`,
  NEXTAUTH_URL: process.env.NEXTAUTH_URL ?? `http://localhost:${port}`,
  NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET ?? secret(),
};

/** A signing secret kept in the data folder, so sessions survive restarts. */
function secret(): string {
  const file = join(dataDir, ".auth-secret");
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString("base64url"), { mode: 0o600 });
  return readFileSync(file, "utf8").trim();
}

function run(what: string, command: string, args: string[]): void {
  const t = Date.now();
  const r = spawnSync(command, args, { stdio: "inherit", env });
  if (r.status !== 0) {
    console.error(`heatcheck: ${what} failed (exit ${r.status ?? "signal"}).`);
    process.exit(1);
  }
  console.log(`heatcheck: ${what} done in ${((Date.now() - t) / 1000).toFixed(1)} s`);
}

function newestSource(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    if (entry.name === "node_modules" || entry.name.startsWith(".")) continue;
    const p = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestSource(p) : statSync(p).mtimeMs);
  }
  return newest;
}

const npx = process.platform === "win32" ? "npx.cmd" : "npx";
run("database migration", npx, ["prisma", "migrate", "deploy"]);
run("demo seed check", npx, ["tsx", "--conditions=react-server", "prisma/seed.ts"]);
const buildId = join(root, ".next", "BUILD_ID");
const sources = Math.max(...["app", "lib", "prisma", "public"].map((d) => newestSource(join(root, d))), statSync(join(root, "package.json")).mtimeMs);
if (!existsSync(buildId) || statSync(buildId).mtimeMs < sources || !existsSync(join(root, "generated", "worker", "analysis-worker.mjs"))) {
  run("analysis worker build", npx, ["tsx", "scripts/build-worker.ts"]);
  run("app build (first start or changed sources)", npx, ["next", "build"]);
}
const demo = process.env.HEATCHECK_DEMO !== "0";
console.log(`
heatcheck is starting on ${env.NEXTAUTH_URL}
  database: ${env.DATABASE_URL}
${
  demo
    ? `  DEMO MODE (HEATCHECK_DEMO=0 turns it off for a shared server)
  demo sign-in — owner: owner@heatcheck.test / pitwall-owner-2026
                 viewer: viewer@heatcheck.test / pitwall-viewer-2026`
    : "  demo off; first owner of an empty server: npm run accounts -- first-owner"
}
  The score is a decision aid, not an airworthiness certificate.
`);
const server = spawn(npx, ["next", "start", "-p", port], { stdio: "inherit", env });
for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => server.kill(signal));
server.on("exit", (code) => process.exit(code ?? 0));
