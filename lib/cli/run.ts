import { closeSync, openSync, writeSync } from "node:fs";
import { analyzeLog, type AnalyzeOptions } from "../analysis/analyze-log";
import { analyzeLogInTwoThreads } from "../analysis/two-threads";
import { DEFAULT_ANALYSIS, type AnalysisSettings } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import { demoCsvChunks } from "../demo/demo-csv";
import { SCENARIOS, type FlyingStyle, type Scenario } from "../demo/generator";
import { InputError, UsageError, isDomainError } from "../errors";
import { parseColumnMap } from "../logs/columns";
import type { ReadSummary } from "../logs/read-log";
import { WINDOW_NAMES } from "../signal/windows";
import { compareAnalyses } from "./compare-logs";
import { choiceFlag, flag, hasSwitch, numberFlag, parseArgs, type ParsedArgs } from "./args";
import { fileSource, userPath } from "./file-source";
import { formatAnalysis, formatAssessment } from "./format";
import { analyzeJson, compareJson } from "./json-shapes";

export const USAGE = `heatcheck — vibration health of racing quads from flight-controller logs

usage:
  heatcheck analyze <log.csv> [--nperseg N] [--overlap F] [--window hann|hamming|blackman-harris]
                    [--average mean|median] [--map MAP] [--max-mb N] [--json]
  heatcheck compare <log.csv> --baseline <good1.csv> [--baseline <good2.csv> …] [--map MAP] [--json]
  heatcheck demo-log <out.csv> [--scenario ${SCENARIOS.join("|")}] [--severity 1|2|3]
                    [--seed N] [--duration S] [--rate HZ] [--style normal|hard] [--airframe NAME]

MAP names foreign columns: time=Time (us)|us,roll=GyroX|rad/s,pitch=GyroY|rad/s,yaw=GyroZ|rad/s,
throttle=Thr|pulse-us,rpm1=Motor 1|hz   (units: us ms s · deg/s rad/s · fraction percent pulse-us · rpm hz)

exit codes: 0 done · 1 the input could not be used (message on stderr) · 2 bad usage`;

export interface CliIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

export interface CliOptions {
  /**
   * The entry module's URL, when it serves the analysis thread too: logs are then parsed on one
   * thread and analysed on another. Without it everything runs on this thread.
   */
  entryUrl?: string;
}

const ANALYSIS_FLAGS = ["nperseg", "overlap", "window", "average", "map", "max-mb"];

/** Runs one CLI command and returns its exit code. Never throws. */
export async function runCli(
  argv: readonly string[],
  io: CliIo,
  cli: CliOptions = {},
): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case "analyze":
        return await analyzeCommand(parseArgs(rest, ANALYSIS_FLAGS, ["json"]), io, cli);
      case "compare":
        return await compareCommand(
          parseArgs(rest, [...ANALYSIS_FLAGS, "baseline"], ["json"]),
          io,
          cli,
        );
      case "demo-log":
        return demoLogCommand(
          parseArgs(rest, [
            "scenario",
            "severity",
            "seed",
            "duration",
            "rate",
            "style",
            "airframe",
          ]),
          io,
        );
      case undefined:
      case "help":
      case "--help":
      case "-h":
        io.stdout(USAGE + "\n");
        return command === undefined ? 2 : 0;
      default:
        throw new UsageError(`unknown command "${command}"`);
    }
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`heatcheck: ${e.message}\n\n${USAGE}\n`);
      return 2;
    }
    if (isDomainError(e)) {
      io.stderr(`heatcheck: ${e.message}\n`);
      return 1;
    }
    io.stderr(`heatcheck: unexpected failure: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  }
}

function analyzeOptions(args: ParsedArgs): AnalyzeOptions {
  const settings: Partial<AnalysisSettings> = {
    nperseg: numberFlag(args, "nperseg", undefined, 64, 65536, true),
    overlap: numberFlag(args, "overlap", DEFAULT_ANALYSIS.overlap, 0, 0.95),
    window: choiceFlag(args, "window", WINDOW_NAMES, DEFAULT_ANALYSIS.window),
    average: choiceFlag(args, "average", ["mean", "median"] as const, DEFAULT_ANALYSIS.average),
  };
  if (settings.nperseg !== undefined && (settings.nperseg & (settings.nperseg - 1)) !== 0) {
    throw new UsageError(`--nperseg must be a power of two, got ${settings.nperseg}`);
  }
  const mapText = flag(args, "map");
  const maxMb = numberFlag(args, "max-mb", 512, 1, 1_000_000);
  return {
    settings,
    map: mapText ? parseColumnMap(mapText) : undefined,
    maxBytes: (maxMb ?? 512) * 1024 * 1024,
  };
}

async function analyzeFile(
  path: string,
  options: AnalyzeOptions,
  cli: CliOptions,
): Promise<{ analysis: LogAnalysis; summary: ReadSummary }> {
  const source = await fileSource(path);
  try {
    const run = cli.entryUrl
      ? analyzeLogInTwoThreads(source, { ...options, entryUrl: cli.entryUrl })
      : analyzeLog(source, options);
    return await run;
  } catch (e) {
    // Say which file, since compare reads several.
    if (isDomainError(e)) throw new InputError(`${path}: ${e.message}`);
    throw e;
  }
}

function onePositional(args: ParsedArgs, what: string): string {
  if (args.positionals.length !== 1) throw new UsageError(`give exactly one ${what}`);
  return args.positionals[0] ?? "";
}

async function analyzeCommand(args: ParsedArgs, io: CliIo, cli: CliOptions): Promise<number> {
  const path = onePositional(args, "log file");
  const { analysis, summary } = await analyzeFile(path, analyzeOptions(args), cli);
  io.stdout(
    hasSwitch(args, "json")
      ? JSON.stringify(analyzeJson(analysis)) + "\n"
      : formatAnalysis(path, analysis, summary.gapCount),
  );
  return 0;
}

async function compareCommand(args: ParsedArgs, io: CliIo, cli: CliOptions): Promise<number> {
  const path = onePositional(args, "log file to check");
  const baselines = args.flags.get("baseline") ?? [];
  if (baselines.length === 0)
    throw new UsageError("compare needs at least one --baseline <known-good log>");
  const options = analyzeOptions(args);
  const good = [];
  for (const b of baselines) good.push((await analyzeFile(b, options, cli)).analysis);
  const log = (await analyzeFile(path, options, cli)).analysis;
  const assessment = compareAnalyses(log, good);
  io.stdout(
    hasSwitch(args, "json")
      ? JSON.stringify(compareJson(assessment)) + "\n"
      : formatAssessment(path, assessment),
  );
  return 0;
}

function demoLogCommand(args: ParsedArgs, io: CliIo): number {
  const out = onePositional(args, "output file");
  const scenario = choiceFlag<Scenario>(args, "scenario", SCENARIOS, "healthy");
  const severity = (numberFlag(args, "severity", 2, 1, 3, true) ?? 2) as 1 | 2 | 3;
  const seed = numberFlag(args, "seed", 1, 0, 2 ** 31, true) ?? 1;
  const durationS = numberFlag(args, "duration", 60, 1, 24 * 3600) ?? 60;
  const sampleRateHz = numberFlag(args, "rate", 4000, 500, 16000, true) ?? 4000;
  const style = choiceFlag<FlyingStyle>(args, "style", ["normal", "hard"], "normal");
  const airframe = flag(args, "airframe") ?? "Demo-01";
  let fd: number;
  try {
    fd = openSync(userPath(out), "w");
  } catch (e) {
    throw new InputError(`cannot write ${out}: ${(e as Error).message}`);
  }
  let bytes = 0;
  try {
    for (const chunk of demoCsvChunks(
      { seed, scenario, severity, durationS, sampleRateHz, style },
      {
        airframe,
        flownAt: new Date(Date.UTC(2026, 10, 28, 14, 5)).toISOString(),
        note: `demo ${scenario}`,
      },
    )) {
      bytes += writeSync(fd, chunk);
    }
  } finally {
    closeSync(fd);
  }
  io.stderr(
    `wrote ${out}: ${durationS} s at ${sampleRateHz} Hz, scenario ${scenario}${scenario === "healthy" ? "" : ` (severity ${severity})`}, ${(bytes / 1e6).toFixed(1)} MB\n`,
  );
  return 0;
}
