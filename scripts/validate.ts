// The validation matrix: `npm run validate [-- --quick] [--json] [--workers N] [--duration S]
// [--airframes 1,2] [--rates 1000,4000] [--classes crack,bent-prop]`. Simulated logs of every case
// go through the same reader, analyser and comparison as `heatcheck compare`; the confusion tables
// go to stdout (or one JSON document with --json), progress to stderr. Exit code 0 when the matrix
// meets issue 8's "done when", 1 when it does not, 2 for bad usage.
//
// Jobs run on worker threads (this same file started again with a marker in workerData).
import { availableParallelism } from "node:os";
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { UsageError } from "../lib/errors";
import { flag, hasSwitch, numberFlag, parseArgs } from "../lib/cli/args";
import { DAMAGE_CLASSES, type DamageClass } from "../lib/demo/fc-sim/damage";
import {
  CaseRunner,
  FULL_MATRIX,
  LOG_RATES,
  QUICK_MATRIX,
  formatSummary,
  matrixJobs,
  summarise,
  type CaseResult,
  type Job,
  type MatrixOptions,
} from "../lib/demo/validation/matrix";

const ROLE = "heatcheck-validate-worker";

type ToWorker = { type: "job"; job: Job } | { type: "stop" };
type FromWorker = { type: "ready" } | { type: "done"; results: CaseResult[] };

function serveWorker(): void {
  const port = parentPort;
  const data = workerData as { role: string; options: MatrixOptions };
  if (!port) return;
  const runner = new CaseRunner(data.options);
  port.on("message", (m: ToWorker) => {
    if (m.type === "stop") {
      port.close();
      return;
    }
    void runner
      .run(m.job)
      .then((results) => port.postMessage({ type: "done", results } satisfies FromWorker));
  });
  port.postMessage({ type: "ready" } satisfies FromWorker);
}

function list<T extends string | number>(
  raw: string | undefined,
  parse: (s: string) => T,
  allowed: readonly T[],
  name: string,
): T[] | undefined {
  if (raw === undefined) return undefined;
  const items = raw
    .split(",")
    .map((s) => s.trim())
    .filter((s) => s !== "")
    .map(parse);
  for (const x of items)
    if (!allowed.includes(x))
      throw new UsageError(`--${name}: ${x} is not one of ${allowed.join(", ")}`);
  if (items.length === 0) throw new UsageError(`--${name} needs at least one value`);
  return items;
}

function optionsFrom(argv: string[]): { options: MatrixOptions; json: boolean; workers: number } {
  const args = parseArgs(
    argv,
    ["workers", "duration", "airframes", "rates", "classes"],
    ["quick", "json"],
  );
  const base = hasSwitch(args, "quick") ? QUICK_MATRIX : FULL_MATRIX;
  const options: MatrixOptions = {
    ...base,
    durationS: numberFlag(args, "duration", base.durationS, 8, 120) ?? base.durationS,
    airframes:
      list(flag(args, "airframes"), Number, [1, 2, 3, 4, 5, 6, 7, 8, 9], "airframes") ??
      base.airframes,
    rates: list(flag(args, "rates"), Number, LOG_RATES, "rates") ?? base.rates,
    classes:
      list<DamageClass>(
        flag(args, "classes"),
        (s) => s as DamageClass,
        DAMAGE_CLASSES,
        "classes",
      ) ?? base.classes,
  };
  const workers =
    numberFlag(args, "workers", Math.max(1, availableParallelism()), 0, 32, true) ?? 1;
  return { options, json: hasSwitch(args, "json"), workers };
}

async function runJobs(
  jobs: Job[],
  options: MatrixOptions,
  workers: number,
  progress: (done: number) => void,
): Promise<CaseResult[]> {
  const results: CaseResult[] = [];
  if (workers === 0) {
    const runner = new CaseRunner(options);
    for (const job of jobs) {
      results.push(...(await runner.run(job)));
      progress(results.length);
    }
    return results;
  }
  const queue = [...jobs];
  const entry = new URL(import.meta.url);
  await Promise.all(
    Array.from(
      { length: Math.min(workers, jobs.length) },
      () =>
        new Promise<void>((resolve, reject) => {
          const data = { role: ROLE, options };
          // Under tsx a worker does not inherit the loader: register it first, then load this file.
          const w = entry.pathname.endsWith(".ts")
            ? new Worker(
                `import("tsx/esm/api").then((tsx) => { tsx.register(); return import(${JSON.stringify(entry.href)}); });`,
                { eval: true, workerData: data },
              )
            : new Worker(entry, { workerData: data });
          const next = () => {
            const job = queue.shift();
            if (job) w.postMessage({ type: "job", job } satisfies ToWorker);
            else {
              w.postMessage({ type: "stop" } satisfies ToWorker);
              void w.terminate().then(() => resolve());
            }
          };
          w.on("message", (m: FromWorker) => {
            if (m.type === "done") {
              results.push(...m.results);
              progress(results.length);
            }
            next();
          });
          w.on("error", reject);
        }),
    ),
  );
  return results;
}

async function main(): Promise<number> {
  let parsed;
  try {
    parsed = optionsFrom(process.argv.slice(2));
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`validate: ${e.message}\n`);
      return 2;
    }
    throw e;
  }
  const { options, json, workers } = parsed;
  const jobs = matrixJobs(options);
  const expected = jobs.reduce((s, j) => s + j.pairs.length, 0);
  const started = performance.now();
  process.stderr.write(
    `validate: ${jobs.length} flights, ${expected} logs on ${workers || "no"} worker thread${workers === 1 ? "" : "s"}\n`,
  );
  const results = await runJobs(jobs, options, workers, (done) => {
    if (process.stderr.isTTY) process.stderr.write(`\r  ${done}/${expected} logs`);
  });
  const order = new Map(jobs.map((j, i) => [j.id, i]));
  results.sort(
    (a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0) || a.testRate - b.testRate,
  );
  const summary = summarise(results, options);
  const seconds = (performance.now() - started) / 1000;
  process.stderr.write(
    `${process.stderr.isTTY ? "\n" : ""}validate: ${results.length} logs in ${seconds.toFixed(0)} s\n`,
  );
  if (json) process.stdout.write(JSON.stringify({ options, seconds, summary, results }) + "\n");
  else process.stdout.write(formatSummary(summary, options));
  return summary.done.pass ? 0 : 1;
}

if (!isMainThread && (workerData as { role?: string } | null)?.role === ROLE) serveWorker();
else process.exitCode = await main();
