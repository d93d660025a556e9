// npm run bench — speed and memory of `heatcheck analyze` as a whole process, on logs made by the
// demo generator: a 300 s × 4 kHz log and a ~1 GB log. Reports medians of repeated runs, MB/s and
// peak RSS, and (when Debian's python3-pandas and python3-scipy are there) the same Welch PSD done
// by pandas + scipy as the reference. Results are printed as a Markdown table for the README.
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { build } from "esbuild";

const OUT = "bench-out";
const RUNS = Number(process.env.BENCH_RUNS ?? 5);
mkdirSync(OUT, { recursive: true });

async function bundleCli(): Promise<string> {
  const file = join(OUT, "cli.mjs");
  await build({ entryPoints: ["scripts/cli.ts"], bundle: true, platform: "node", format: "esm", target: "node20", outfile: file, logLevel: "warning" });
  // A wrapper that runs the CLI and then reports the process's own peak RSS on stderr.
  writeFileSync(
    join(OUT, "measure.mjs"),
    `process.on("exit", () => process.stderr.write("\\nBENCH_MAX_RSS_KB " + process.resourceUsage().maxRSS + "\\n"));\nawait import("./cli.mjs");\n`,
  );
  return join(OUT, "measure.mjs");
}

function makeLog(name: string, durationS: number): string {
  const file = join(OUT, name);
  if (!existsSync(file)) {
    console.error(`making ${file} (${durationS} s at 4 kHz)…`);
    const r = spawnSync("npx", ["tsx", "scripts/cli.ts", "demo-log", file, "--seed", "42", "--duration", String(durationS)], { stdio: "inherit" });
    if (r.status !== 0) throw new Error("demo-log failed");
  }
  return file;
}

interface Run {
  wallS: number;
  rssMb: number;
}

function timeAnalyze(measure: string, file: string): Run {
  const t = process.hrtime.bigint();
  const r = spawnSync("node", [measure, "analyze", file, "--json", "--max-mb", "4096"], { encoding: "utf8", maxBuffer: 1 << 30 });
  const wallS = Number(process.hrtime.bigint() - t) / 1e9;
  if (r.status !== 0) throw new Error(`analyze failed: ${r.stderr}`);
  const m = /BENCH_MAX_RSS_KB (\d+)/.exec(r.stderr);
  return { wallS, rssMb: m ? Number(m[1]) / 1024 : Number.NaN };
}

function timePython(file: string): number | null {
  const script = `
import sys, time
t = time.perf_counter()
import pandas as pd
from scipy import signal
import numpy as np
df = pd.read_csv(sys.argv[1], comment="#")
fs = 1e6 / np.median(np.diff(df["time_us"].to_numpy()))
n = 1 << int(np.ceil(np.log2(fs / 2)))
for axis in ("gyro_roll", "gyro_pitch", "gyro_yaw"):
    signal.welch(df[axis].to_numpy(), fs=fs, nperseg=n)
print(time.perf_counter() - t)
`;
  const r = spawnSync("/usr/bin/python3", ["-c", script, file], { encoding: "utf8" });
  if (r.status !== 0) return null;
  const t = process.hrtime.bigint();
  const again = spawnSync("/usr/bin/python3", ["-c", script, file], { encoding: "utf8" });
  return again.status === 0 ? Number(process.hrtime.bigint() - t) / 1e9 : null;
}

function median(values: number[]): number {
  const v = [...values].sort((a, b) => a - b);
  const mid = v.length >> 1;
  return v.length % 2 ? (v[mid] ?? NaN) : ((v[mid - 1] ?? NaN) + (v[mid] ?? NaN)) / 2;
}

const measure = await bundleCli();
const cases = [
  { label: "300 s × 4 kHz", file: makeLog("bench-300s.csv", 300), runs: RUNS, targetS: 0.7, targetRss: 150 },
  { label: "~1 GB", file: makeLog("bench-1gb.csv", 3960), runs: Math.max(1, Math.min(3, RUNS)), targetS: Number.NaN, targetRss: 200 },
];
const rows: string[] = [];
for (const c of cases) {
  const mb = statSync(c.file).size / 1e6;
  const runs: Run[] = [];
  for (let i = 0; i < c.runs; i++) runs.push(timeAnalyze(measure, c.file));
  const wall = median(runs.map((r) => r.wallS));
  const rss = Math.max(...runs.map((r) => r.rssMb));
  const py = c.label.startsWith("300") ? timePython(c.file) : null;
  rows.push(
    `| ${c.label} | ${mb.toFixed(0)} MB | ${wall.toFixed(2)} s | ${(mb / wall).toFixed(0)} MB/s | ${rss.toFixed(0)} MB | ${Number.isFinite(c.targetS) ? `≤ ${c.targetS} s, ` : ""}≤ ${c.targetRss} MB | ${py === null ? "–" : `${py.toFixed(2)} s (${(py / wall).toFixed(1)}×)`} |`,
  );
  console.error(`${c.label}: runs ${runs.map((r) => r.wallS.toFixed(2)).join(", ")} s`);
}
console.log(`\nheatcheck analyze, whole process (node ${process.version}, ${RUNS} runs, median wall, peak RSS of any run)\n`);
console.log("| log | size | wall (median) | throughput | peak RSS | target | pandas + scipy (same Welch) |");
console.log("|---|---|---|---|---|---|---|");
for (const r of rows) console.log(r);
