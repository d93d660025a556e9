// npm start: everything a fresh clone needs to come up — the data folder, the SQLite database
// created and migrated, the analysis worker bundled, the demo team seeded when the database is
// empty, the app built when its sources changed — then `next start`. Settings come from the
// environment (see README). The tests start the app through this script too, so what users run is
// what the suite runs.
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { createInterface } from "node:readline";
import { config, inheritedEnvironment, type Config } from "../lib/config";
import { DEMO_ACCOUNTS } from "../lib/demo/accounts";
import { isDomainError } from "../lib/errors";
import { DECISION_AID_NOTE } from "../lib/health/safety";

const root = process.cwd();

const startedAt = Date.now();
const children = new Set<ChildProcess>();
let stopping = false;

function say(line: string): void {
  console.log(`heatcheck: ${line}`);
}

/** Stops with one sentence a user can act on, never a stack trace. */
function fail(sentence: string): never {
  console.error(`\nheatcheck could not start: ${sentence}`);
  for (const c of children) c.kill("SIGTERM");
  process.exit(1);
}

function seconds(since: number): string {
  return `${((Date.now() - since) / 1000).toFixed(1)} s`;
}

/**
 * Lines of Prisma's that would mislead here: the schema's datasource url is a literal that the CLI
 * needs to stay on its JavaScript engine (prisma/schema.prisma), so Prisma names a "dev.db" that
 * is never used and warns that the url is ignored. The database really used is printed at start.
 */
const PRISMA_NOISE = [
  /^Datasource "db": SQLite database "dev\.db"/,
  /^WARNING: Your schema specifies the following datasource properties/,
  /^- url$/,
  /^The values from your schema will NOT be used!$/,
  /^We recommend you to remove those properties from your schema/,
];

/** Runs one step as a child process, its output prefixed so that parallel steps stay readable. */
function step(
  what: string,
  command: string,
  args: string[],
  env: NodeJS.ProcessEnv,
  hint: string,
  noise: readonly RegExp[] = [],
): Promise<void> {
  const t = Date.now();
  say(`${what}…`);
  return new Promise((done) => {
    const child = spawn(command, args, { env, stdio: ["ignore", "pipe", "pipe"] });
    children.add(child);
    const prefix = (from: NodeJS.ReadableStream, out: NodeJS.WriteStream) =>
      createInterface({ input: from }).on("line", (line) => {
        const text = line.trim();
        if (text !== "" && !noise.some((n) => n.test(text))) out.write(`  [${what}] ${line}\n`);
      });
    prefix(child.stdout, process.stdout);
    prefix(child.stderr, process.stderr);
    child.on("error", () => fail(hint));
    child.on("exit", (code) => {
      children.delete(child);
      if (stopping) {
        if (children.size === 0) process.exit(0);
        return;
      }
      if (code !== 0) fail(hint);
      say(`${what} done in ${seconds(t)}`);
      done();
    });
  });
}

/** Every setting, checked before anything starts: a bad value stops here with its sentence. */
function settings(): Config {
  try {
    return config();
  } catch (e) {
    if (isDomainError(e)) fail(e.message);
    throw e;
  }
}
// Loopback unless told otherwise (lib/config.ts): a pit laptop on a shared Wi-Fi should not serve
// the team's records to everyone in range by accident.
const { dataDir, port, host, databaseUrl, publicUrl, demo } = settings();

/** A signing secret kept in the data folder, so sessions survive restarts. */
function authSecret(): string {
  const file = join(dataDir, ".auth-secret");
  if (!existsSync(file))
    writeFileSync(file, randomBytes(32).toString("base64url"), { mode: 0o600 });
  return readFileSync(file, "utf8").trim();
}

function newestSource(path: string): number {
  if (!existsSync(path)) return 0;
  const stat = statSync(path);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = 0;
  for (const entry of readdirSync(path, { withFileTypes: true })) {
    if (entry.name === "node_modules" || entry.name.startsWith(".")) continue;
    newest = Math.max(newest, newestSource(join(path, entry.name)));
  }
  return newest;
}

/** True when `output` is missing or older than any of `sources`. */
function stale(output: string, sources: string[]): boolean {
  if (!existsSync(output)) return true;
  const built = statSync(output).mtimeMs;
  return sources.some((s) => newestSource(join(root, s)) > built);
}

async function main(): Promise<void> {
  try {
    mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  } catch {
    fail(
      `the data folder ${dataDir} cannot be created; set HEATCHECK_DATA_DIR to a folder you can write to.`,
    );
  }
  const env: NodeJS.ProcessEnv = {
    ...inheritedEnvironment(),
    NEXT_TELEMETRY_DISABLED: "1",
    HEATCHECK_DATA_DIR: dataDir,
    DATABASE_URL: databaseUrl,
    NEXTAUTH_URL: publicUrl,
    NEXTAUTH_SECRET: settings().authSecret ?? authSecret(),
  };
  const npx = process.platform === "win32" ? "npx.cmd" : "npx";

  await step(
    "database migration",
    npx,
    ["prisma", "migrate", "deploy"],
    env,
    `the database (${env.DATABASE_URL}) could not be created or migrated; check that the data folder is writable and not full, and that no other program holds the file.`,
    PRISMA_NOISE,
  );

  // The seed analyses its demo logs on the worker threads, so the worker comes before the seed.
  const workerBundles = ["analysis-worker.mjs", "upload-check-worker.mjs"].map((f) =>
    join(root, "generated", "worker", f),
  );
  if (workerBundles.some((bundle) => stale(bundle, ["lib"]))) {
    await step(
      "worker build",
      npx,
      ["tsx", "scripts/build-bundles.ts", "worker"],
      env,
      "the worker threads could not be built; run `npm install` again, then `npm start`.",
    );
  }

  // Seeding (33 demo analyses) and building the app are independent: run them side by side.
  const buildId = join(root, ".next", "BUILD_ID");
  const needsBuild = stale(buildId, [
    "app",
    "lib",
    "prisma",
    "public",
    "package.json",
    "next.config.ts",
    "proxy.ts",
    "instrumentation.ts",
  ]);
  await Promise.all([
    step(
      "demo seed check",
      npx,
      ["tsx", "--conditions=react-server", "prisma/seed.ts"],
      env,
      "the demo team could not be seeded (see the lines above); nothing was kept, so the next `npm start` tries again.",
    ),
    needsBuild
      ? step(
          "app build (first start or changed sources)",
          npx,
          ["next", "build"],
          env,
          "the app could not be built (see the lines above): if you changed the sources, fix what it names; otherwise run `npm install` again, then `npm start`.",
        )
      : Promise.resolve(),
  ]);

  const server = spawn(npx, ["next", "start", "-p", String(port), "-H", host], {
    stdio: ["ignore", "inherit", "inherit"],
    env,
  });
  children.add(server);
  server.on("exit", (code) => {
    if (stopping) say("stopped");
    process.exit(code ?? 0);
  });
  console.log(`
heatcheck is starting on ${env.NEXTAUTH_URL} (listening on ${host}:${port}; prepared in ${seconds(startedAt)})
  database: ${env.DATABASE_URL}
${
  !demo
    ? "  demo off (HEATCHECK_DEMO=0); first owner of an empty server: npm run accounts -- first-owner"
    : `  DEMO MODE (HEATCHECK_DEMO=0 turns it off); demo sign-in, while the demo team exists:
${DEMO_ACCOUNTS.map((a) => `    ${a.role.padEnd(6)} ${a.email} / ${a.password}`).join("\n")}`
}
  ${DECISION_AID_NOTE}
`);
}

for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.on(signal, () => {
    if (!stopping) say(`stopping (${signal}); analyses not finished resume at the next start`);
    stopping = true;
    for (const c of children) c.kill(signal);
    if (children.size === 0) process.exit(0);
    setTimeout(() => process.exit(0), 10_000).unref();
  });
}

void main();
