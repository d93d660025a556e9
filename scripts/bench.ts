// npm run bench — speed and memory of the command line exactly as the README gives it,
// `npx heatcheck analyze <log>`, as a whole process, on logs made by the demo generator: a
// 300 s × 4 kHz log and a ~1 GB log. Also times the same bundle started by Node directly (what
// `heatcheck …` runs after `npm link`), so npm's own start-up shows separately. Reports medians of
// repeated runs, MB/s and peak RSS, and (when Debian's python3-pandas and python3-scipy are there)
// the same Welch PSD done by pandas + scipy as the reference, with the ratio of our time to its.
// Results are printed as a Markdown table for the README.
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, statSync } from "node:fs";
import { join } from "node:path";
import { config, inheritedEnvironment } from "../lib/config";

const OUT = "bench-out";
const RUNS = config().tools.benchRuns ?? 5;
mkdirSync(OUT, { recursive: true });

/** The README's command, and the linked one. */
const COMMANDS = {
  npx: { label: "`npx heatcheck analyze`", command: "npx", prefix: ["heatcheck"] },
  linked: {
    label: "`heatcheck analyze` (after npm link)",
    command: process.execPath,
    prefix: ["scripts/heatcheck.mjs"],
  },
} as const;

function makeLog(name: string, durationS: number): string {
  const file = join(OUT, name);
  if (!existsSync(file)) {
    console.error(`making ${file} (${durationS} s at 4 kHz)…`);
    const r = spawnSync(
      process.execPath,
      ["scripts/heatcheck.mjs", "demo-log", file, "--seed", "42", "--duration", String(durationS)],
      { stdio: "inherit" },
    );
    if (r.status !== 0) throw new Error("demo-log failed");
  }
  return file;
}

interface Run {
  wallS: number;
  rssMb: number;
}

function timeAnalyze(how: keyof typeof COMMANDS, file: string): Run {
  const { command, prefix } = COMMANDS[how];
  const t = process.hrtime.bigint();
  const r = spawnSync(command, [...prefix, "analyze", file, "--max-mb", "4096"], {
    encoding: "utf8",
    maxBuffer: 1 << 30,
    env: { ...inheritedEnvironment(), HEATCHECK_REPORT_RSS: "1" },
  });
  const wallS = Number(process.hrtime.bigint() - t) / 1e9;
  if (r.status !== 0) throw new Error(`analyze failed: ${r.stderr}`);
  const m = /HEATCHECK_MAX_RSS_KB (\d+)/.exec(r.stderr);
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

// First run builds the bundle if needed; it is not timed.
spawnSync(process.execPath, ["scripts/heatcheck.mjs", "--help"], { stdio: "ignore" });
const cases = [
  {
    label: "300 s × 4 kHz",
    file: makeLog("bench-300s.csv", 300),
    runs: RUNS,
    targetS: 0.7,
    targetRss: 150,
    python: true,
  },
  {
    label: "~1 GB",
    file: makeLog("bench-1gb.csv", 3960),
    runs: Math.max(1, Math.min(3, RUNS)),
    targetS: Number.NaN,
    targetRss: 200,
    python: false,
  },
];
const rows: string[] = [];
for (const c of cases) {
  const mb = statSync(c.file).size / 1e6;
  const py = c.python ? timePython(c.file) : null;
  for (const how of ["npx", "linked"] as const) {
    const runs: Run[] = [];
    for (let i = 0; i < c.runs; i++) runs.push(timeAnalyze(how, c.file));
    const wall = median(runs.map((r) => r.wallS));
    const rss = Math.max(...runs.map((r) => r.rssMb));
    rows.push(
      `| ${c.label} | ${mb.toFixed(0)} MB | ${COMMANDS[how].label} | ${wall.toFixed(2)} s | ${(mb / wall).toFixed(0)} MB/s | ${rss.toFixed(0)} MB | ${Number.isFinite(c.targetS) ? `≤ ${c.targetS} s, ` : ""}≤ ${c.targetRss} MB | ${py === null ? "–" : `${py.toFixed(2)} s (ours ${(wall / py).toFixed(2)}×)`} |`,
    );
    console.error(`${c.label}, ${how}: runs ${runs.map((r) => r.wallS.toFixed(2)).join(", ")} s`);
  }
}
console.log(
  `\nheatcheck analyze, whole process (node ${process.version}, ${RUNS} runs, median wall, peak RSS of any run)\n`,
);
console.log(
  "| log | size | command | wall (median) | throughput | peak RSS | target | pandas + scipy (Welch only) |",
);
console.log("|---|---|---|---|---|---|---|---|");
for (const r of rows) console.log(r);
