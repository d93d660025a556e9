import { availableParallelism } from "node:os";
import { join, resolve } from "node:path";
import { z } from "zod";
import { ConfigError } from "./errors";

/**
 * Every environment variable heatcheck reads, its type and its default, validated in one place
 * (README, "Settings", is the user's table of the same). Nothing else reads `process.env`: call
 * `config()`, which reads the environment afresh each time (tests and the start script change it
 * between calls), so it is cheap and never cached. A value that does not parse throws a
 * ConfigError naming the variable; `npm start` checks the whole set before it does anything else.
 *
 * An empty value counts as unset (a shell's `FOO= npm start`).
 */

const unset = (v: unknown) => (v === "" ? undefined : v);

function text() {
  return z.preprocess(unset, z.string().optional());
}

/** A number that parses and meets `rule`; `what` is the sentence's "must be …". */
type CoercedNumber = ReturnType<typeof z.coerce.number>;
function numberWhere(what: string, rule: (n: CoercedNumber) => CoercedNumber) {
  return z.preprocess(
    unset,
    rule(z.coerce.number({ message: what }).finite({ message: what })).optional(),
  );
}
const positiveNumber = (what: string) => numberWhere(what, (n) => n.positive({ message: what }));
const positiveInteger = (what: string) =>
  numberWhere(what, (n) => n.int({ message: what }).positive({ message: what }));
const nonNegative = () => {
  const what = "a number, 0 or more";
  return numberWhere(what, (n) => n.min(0, { message: what }));
};
const PORT_RULE = "a TCP port, 1–65535";

const environmentSchema = z.object({
  PORT: numberWhere(PORT_RULE, (n) =>
    n.int({ message: PORT_RULE }).min(1, { message: PORT_RULE }).max(65535, { message: PORT_RULE }),
  ),
  HEATCHECK_HOST: text(),
  HEATCHECK_DATA_DIR: text(),
  DATABASE_URL: text(),
  NEXTAUTH_URL: z.preprocess(
    unset,
    z.url({ message: "an address such as https://pits.club.example" }).optional(),
  ),
  NEXTAUTH_SECRET: text(),
  HEATCHECK_MAX_UPLOAD_MB: positiveNumber("a number of megabytes above 0"),
  HEATCHECK_WORKERS: z.preprocess(
    unset,
    z.string().regex(/^\d+$/, { message: "a whole number of threads, 0 or more" }).optional(),
  ),
  HEATCHECK_UPLOADS_PER_CALLER: positiveInteger("a whole number above 0"),
  HEATCHECK_UPLOADS_AT_ONCE: positiveInteger("a whole number above 0"),
  HEATCHECK_QUEUED_PER_TEAM: positiveInteger("a whole number above 0"),
  HEATCHECK_SHUTDOWN_S: positiveNumber("a number of seconds above 0"),
  HEATCHECK_DEMO: text(),
  HEATCHECK_TRUST_PROXY: text(),
  /** the first owner's password for `npm run accounts -- first-owner` (otherwise asked for) */
  HEATCHECK_OWNER_PASSWORD: text(),
  /** npm's folder of the command line that ran a script: relative paths resolve from there */
  INIT_CWD: text(),
  NODE_ENV: text(),
  /** developer tools: runs per benchmark case (`npm run bench`, default 5) */
  BENCH_RUNS: nonNegative(),
  /** developer tools: the soak run's size (`npm run soak`) */
  SOAK_READERS: nonNegative(),
  SOAK_UPLOADERS: nonNegative(),
  SOAK_SECONDS: nonNegative(),
  SOAK_UPLOAD_MB: nonNegative(),
  SOAK_KILLS: nonNegative(),
});

export interface Config {
  /** HTTP port of `npm start` (default 3000). */
  port: number;
  /** Address the server listens on (default loopback, 127.0.0.1). */
  host: string;
  /** Absolute path of the data folder (default ./data from the working directory). */
  dataDir: string;
  /** The SQLite database (default `file:<data dir>/heatcheck.db`). */
  databaseUrl: string;
  /** The address people open (default http://localhost:<port>); https:// makes cookies Secure. */
  publicUrl: string;
  /** NEXTAUTH_URL exactly as set, when it is set (the origin check trusts only a configured one). */
  configuredPublicUrl: string | undefined;
  /** Session signing key; `npm start` generates one into the data folder when unset. */
  authSecret: string | undefined;
  /** Upload size limit in bytes (HEATCHECK_MAX_UPLOAD_MB, default 512 MB). */
  maxUploadBytes: number;
  /** Analysis worker threads (default cores − 1, at least 1); 0 runs analyses inline. */
  workers: number;
  /** Uploads one member or one API token may stream at once (default 4). */
  uploadsPerCaller: number;
  /** Uploads the whole server streams at once (default the number of cores, at least 2). */
  uploadsAtOnce: number;
  /** Analyses one team may have waiting or running (default 200). */
  queuedPerTeam: number;
  /** Seconds the server may take to stop after SIGTERM/SIGINT (default 10). */
  shutdownGraceS: number;
  /** Demo mode: on unless HEATCHECK_DEMO=0. */
  demo: boolean;
  /** Trust X-Forwarded-For from a reverse proxy: only with HEATCHECK_TRUST_PROXY=1. */
  trustProxy: boolean;
  ownerPassword: string | undefined;
  /** Where a relative path given on a command line is resolved from. */
  invocationDir: string;
  development: boolean;
  production: boolean;
  /** Developer tools' sizes (scripts/bench.ts, scripts/soak.ts); each has its default there. */
  tools: {
    benchRuns?: number;
    soakReaders?: number;
    soakUploaders?: number;
    soakSeconds?: number;
    soakUploadMb?: number;
    soakKills?: number;
  };
}

export const DEFAULTS = {
  port: 3000,
  host: "127.0.0.1",
  maxUploadMb: 512,
  uploadsPerCaller: 4,
  queuedPerTeam: 200,
  shutdownGraceS: 10,
} as const;

/** The configuration from `env` (the process's own by default), or a ConfigError. */
export function config(env: Record<string, string | undefined> = process.env): Config {
  const parsed = environmentSchema.safeParse(env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const name = String(issue?.path[0] ?? "a setting");
    throw new ConfigError(name, env[name], issue?.message ?? "a valid value");
  }
  const e = parsed.data;
  const port = e.PORT ?? DEFAULTS.port;
  // The folder is the operator's choice at run time: not a path for the build to trace.
  const dataDir = resolve(
    /*turbopackIgnore: true*/ e.HEATCHECK_DATA_DIR ?? join(process.cwd(), "data"),
  );
  return {
    port,
    host: e.HEATCHECK_HOST ?? DEFAULTS.host,
    dataDir,
    databaseUrl: e.DATABASE_URL ?? `file:${join(dataDir, "heatcheck.db")}`,
    publicUrl: e.NEXTAUTH_URL ?? `http://localhost:${port}`,
    configuredPublicUrl: e.NEXTAUTH_URL,
    authSecret: e.NEXTAUTH_SECRET,
    maxUploadBytes: (e.HEATCHECK_MAX_UPLOAD_MB ?? DEFAULTS.maxUploadMb) * 1024 * 1024,
    workers:
      e.HEATCHECK_WORKERS === undefined
        ? Math.max(1, availableParallelism() - 1)
        : Number(e.HEATCHECK_WORKERS),
    uploadsPerCaller: e.HEATCHECK_UPLOADS_PER_CALLER ?? DEFAULTS.uploadsPerCaller,
    uploadsAtOnce: e.HEATCHECK_UPLOADS_AT_ONCE ?? Math.max(2, availableParallelism()),
    queuedPerTeam: e.HEATCHECK_QUEUED_PER_TEAM ?? DEFAULTS.queuedPerTeam,
    shutdownGraceS: e.HEATCHECK_SHUTDOWN_S ?? DEFAULTS.shutdownGraceS,
    demo: e.HEATCHECK_DEMO !== "0",
    trustProxy: e.HEATCHECK_TRUST_PROXY === "1",
    ownerPassword: e.HEATCHECK_OWNER_PASSWORD,
    invocationDir: e.INIT_CWD ?? process.cwd(),
    development: e.NODE_ENV === "development",
    production: e.NODE_ENV === "production",
    tools: {
      benchRuns: e.BENCH_RUNS,
      soakReaders: e.SOAK_READERS,
      soakUploaders: e.SOAK_UPLOADERS,
      soakSeconds: e.SOAK_SECONDS,
      soakUploadMb: e.SOAK_UPLOAD_MB,
      soakKills: e.SOAK_KILLS,
    },
  };
}

/** The variables `config()` reads, for the README check and for passing them on to a child. */
export const CONFIG_VARIABLES = Object.keys(environmentSchema.shape);

/**
 * The whole environment, for a child process that must see what this one saw (the start script's
 * steps); read your own settings with `config()`.
 */
export function inheritedEnvironment(): NodeJS.ProcessEnv {
  return { ...process.env };
}
