import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtempSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";

/**
 * The built app on a free loopback port, with its own data folder and SQLite file, migrated and
 * seeded with the demo team, exactly as `npm start` would prepare it.
 */
export interface AppServer {
  url: string;
  dataDir: string;
  env: NodeJS.ProcessEnv;
  stop: () => Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.listen(0, "127.0.0.1", () => {
      const address = s.address();
      const port = typeof address === "object" && address ? address.port : 0;
      s.close(() => resolve(port));
    });
    s.on("error", reject);
  });
}

function run(command: string, args: string[], env: NodeJS.ProcessEnv): void {
  const r = spawnSync(command, args, { env, stdio: "pipe", encoding: "utf8" });
  if (r.status !== 0) throw new Error(`${command} ${args.join(" ")} failed:\n${r.stdout}\n${r.stderr}`);
}

export async function startApp(): Promise<AppServer> {
  const dataDir = mkdtempSync(join(tmpdir(), "heatcheck-app-"));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    NEXT_TELEMETRY_DISABLED: "1",
    DATABASE_URL: `file:${join(dataDir, "heatcheck.db")}`,
    HEATCHECK_DATA_DIR: dataDir,
    HEATCHECK_WORKERS: "1",
    NEXTAUTH_URL: url,
    NEXTAUTH_SECRET: randomBytes(24).toString("hex"),
  };
  // Build unless told a fresh build is already there (the suite builds once per run).
  if (process.env.HEATCHECK_SKIP_BUILD !== "1") run("npm", ["run", "build"], env);
  run("npx", ["prisma", "migrate", "deploy"], env);
  run("npx", ["tsx", "--conditions=react-server", "prisma/seed.ts"], { ...env, HEATCHECK_WORKERS: "0" });
  const child: ChildProcess = spawn("npx", ["next", "start", "-p", String(port), "-H", "127.0.0.1"], { env, stdio: "pipe", detached: true });
  let output = "";
  child.stdout?.on("data", (d: Buffer) => (output += d.toString()));
  child.stderr?.on("data", (d: Buffer) => (output += d.toString()));
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      const r = await fetch(`${url}/signin`);
      if (r.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`the app did not start:\n${output}`);
    await new Promise((r) => setTimeout(r, 300));
  }
  return {
    url,
    dataDir,
    env,
    stop: async () => {
      if (child.pid) process.kill(-child.pid, "SIGTERM");
      await new Promise((r) => setTimeout(r, 300));
    },
  };
}
