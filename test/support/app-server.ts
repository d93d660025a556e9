import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtempSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";

/**
 * The app started the way a user starts it — `npm start`, i.e. scripts/start.ts — on a free
 * loopback port with its own data folder. The start script migrates, seeds the demo team, and
 * builds only when the sources are newer than the last build, so the suite's first start builds
 * and the later ones reuse that build.
 */
export interface AppServer {
  url: string;
  dataDir: string;
  env: NodeJS.ProcessEnv;
  /** Everything the start script and the server printed so far. */
  output: () => string;
  stop: () => Promise<void>;
  /** The process group of npm start and everything it started (the reliability suite's kill -9). */
  pid: number;
  /** SIGKILL to the whole group: no handler runs, as when a laptop loses power. */
  kill: () => Promise<void>;
  /** Resolves true when the start script has exited within `ms`. */
  exited: (ms: number) => Promise<boolean>;
}

export async function freePort(): Promise<number> {
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

export interface StartOptions {
  /** Working folder of `npm start` (default: this checkout). */
  cwd?: string;
  /** Extra environment on top of the port and data folder; a key set to undefined is removed. */
  env?: Record<string, string | undefined>;
  /** A shell command to run instead of `npm start` (the fresh-clone test runs `npm install && npm start`). */
  command?: string;
  /** Use this data folder instead of a new temporary one; null leaves HEATCHECK_DATA_DIR unset (the README default). */
  dataDir?: string | null;
  /** How long to wait for the sign-in page. */
  timeoutMs?: number;
  /** Listen on this port (a restart after a kill keeps its address); default a free one. */
  port?: number;
}

/** Spawns a shell command in its own process group and waits until /signin answers. */
export async function startApp(options: StartOptions = {}): Promise<AppServer> {
  const port = options.port ?? (await freePort());
  const url = `http://127.0.0.1:${port}`;
  const dataDir =
    options.dataDir === undefined ? mkdtempSync(join(tmpdir(), "heatcheck-app-")) : options.dataDir;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NEXT_TELEMETRY_DISABLED: "1",
    PORT: String(port),
    HEATCHECK_WORKERS: "1",
    NEXTAUTH_URL: url,
    NEXTAUTH_SECRET: randomBytes(24).toString("hex"),
    ...(dataDir === null ? {} : { HEATCHECK_DATA_DIR: dataDir }),
    ...options.env,
  };
  if (dataDir === null) delete env.HEATCHECK_DATA_DIR;
  // vitest sets NODE_ENV=test and its own markers; npm start must see the environment a user's
  // shell has (NODE_ENV=production would even make npm install skip the dev dependencies).
  for (const key of ["NODE_ENV", "VITEST", "VITEST_MODE", "VITEST_POOL_ID", "VITEST_WORKER_ID"])
    delete env[key];
  // An option set to undefined removes that variable (the fresh-clone test keeps README defaults).
  for (const [key, value] of Object.entries(options.env ?? {}))
    if (value === undefined) delete env[key];
  const child: ChildProcess = spawn("sh", ["-c", options.command ?? "npm start"], {
    cwd: options.cwd ?? process.cwd(),
    env,
    stdio: ["ignore", "pipe", "pipe"],
    detached: true,
  });
  let output = "";
  let exited: number | null | undefined;
  child.stdout?.on("data", (d: Buffer) => (output += d.toString()));
  child.stderr?.on("data", (d: Buffer) => (output += d.toString()));
  child.on("exit", (code) => (exited = code));
  const stop = async () => {
    if (child.pid && exited === undefined) {
      try {
        process.kill(-child.pid, "SIGTERM");
      } catch {
        // already gone
      }
      const deadline = Date.now() + 15_000;
      while (exited === undefined && Date.now() < deadline)
        await new Promise((r) => setTimeout(r, 100));
      if (exited === undefined) process.kill(-child.pid, "SIGKILL");
    }
  };
  const deadline = Date.now() + (options.timeoutMs ?? 300_000);
  for (;;) {
    if (exited !== undefined)
      throw new Error(`npm start exited (code ${exited}) before serving:\n${output}`);
    try {
      const r = await fetch(`${url}/signin`);
      if (r.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) {
      await stop();
      throw new Error(`the app did not start in time:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  const exitedWithin = async (ms: number) => {
    const until = Date.now() + ms;
    while (exited === undefined && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
    return exited !== undefined;
  };
  const kill = async () => {
    try {
      if (child.pid) process.kill(-child.pid, "SIGKILL");
    } catch {
      // already gone
    }
    await exitedWithin(10_000);
  };
  return {
    url,
    dataDir: dataDir ?? join(options.cwd ?? process.cwd(), "data"),
    env,
    output: () => output,
    stop,
    pid: child.pid ?? 0,
    kill,
    exited: exitedWithin,
  };
}
