import { analyzeLog, bytesSource } from "../../analysis/analyze-log";
import type { LogAnalysis } from "../../analysis/types";
import { compareAnalyses } from "../../cli/compare-logs";
import type { Assessment } from "../../health/compare";
import { STATUS_ORDER, type Status } from "../../health/thresholds";
import { parseColumnMap } from "../../logs/columns";
import { fleetAirframe, type HeaderStyle, type SimAirframe } from "../fc-sim/airframe";
import { writeLogCsv } from "../fc-sim/csv";
import {
  DAMAGE_CLASSES,
  type CaseTruth,
  type DamageClass,
  type DamageSpec,
  type Severity,
} from "../fc-sim/damage";
import type { FlightMix } from "../fc-sim/flight";
import { simulateFlight, type FlightSpec, type LoggedLog } from "../fc-sim/simulate";
import { diagnose } from "./classify";

/**
 * The validation matrix: simulated airframes of one design, each with a baseline from two healthy
 * flights, then test flights — healthy variants and every damage class at three severities — at
 * 1, 2, 4 and 8 kHz logging. Each log is written as a file (canonical or foreign header) and read
 * back through the same reader, analyser and comparison the command line's `compare` uses.
 */

export const HEALTHY_VARIANTS = [
  "repeat",
  "hard",
  "phase-mix",
  "dropout",
  "other-rate",
  "foreign-header",
] as const;
export type HealthyVariant = (typeof HEALTHY_VARIANTS)[number];
export const LOG_RATES = [1000, 2000, 4000, 8000] as const;
export const SEVERITIES: readonly Severity[] = [1, 2, 3];

export interface MatrixOptions {
  airframes: number[];
  rates: number[];
  classes: DamageClass[];
  severities: Severity[];
  healthy: HealthyVariant[];
  /** Length of every simulated flight, s. */
  durationS: number;
}

export const FULL_MATRIX: MatrixOptions = {
  airframes: [1, 2, 3],
  rates: [...LOG_RATES],
  classes: [...DAMAGE_CLASSES],
  severities: [...SEVERITIES],
  healthy: [...HEALTHY_VARIANTS],
  durationS: 24,
};

export const QUICK_MATRIX: MatrixOptions = { ...FULL_MATRIX, airframes: [1], rates: [1000, 4000] };

/** One simulated flight and the log rates at which it is held against which baseline rate. */
export interface Job {
  id: string;
  airframe: number;
  group: "healthy" | "damage";
  variant: HealthyVariant | DamageClass;
  severity: 0 | Severity;
  flight: FlightSpec;
  damage: DamageSpec | null;
  style: HeaderStyle;
  pairs: { testRate: number; baselineRate: number }[];
}

export interface Verdict {
  status: Status;
  score: number | null;
  /** Damage scored ok. */
  miss: boolean;
  /** Healthy scored inspect or ground. */
  falseAlarm: boolean;
  /** The finding that took most points points to the true class. */
  classRight: boolean;
  /** Some finding of the true class is on a true axis / within 5 % of a true frequency / names the true motor; null where the truth has none. */
  axisRight: boolean | null;
  freqRight: boolean | null;
  motorRight: boolean | null;
}

export interface CaseResult {
  id: string;
  airframe: number;
  group: "healthy" | "damage";
  variant: HealthyVariant | DamageClass;
  severity: 0 | Severity;
  testRate: number;
  baselineRate: number;
  style: HeaderStyle;
  truth: CaseTruth;
  verdict: Verdict;
  findings: {
    kind: string;
    axis: string;
    freqHz: number;
    motor?: number;
    points: number;
    severity: string;
    classes: DamageClass[];
  }[];
  error?: string;
}

const FREQ_TOLERANCE = 0.05;
const TEST_MIXES: FlightMix[] = ["race", "freestyle", "hard", "wash-heavy"];

/** The rate a log is recorded at in the other-rate variant, for a baseline at `rate`. */
export function otherRate(rate: number): number {
  const i = LOG_RATES.findIndex((r) => r === rate);
  return LOG_RATES[(i + LOG_RATES.length - 1) % LOG_RATES.length] ?? 4000;
}

function otherStyle(style: HeaderStyle): HeaderStyle {
  return style === "canonical" ? "foreign-a" : style === "foreign-a" ? "foreign-b" : "foreign-a";
}

/** Every job of the matrix, in a stable order. */
export function matrixJobs(o: MatrixOptions): Job[] {
  const jobs: Job[] = [];
  for (const id of o.airframes) {
    const airframe = fleetAirframe(id);
    const same = o.rates.map((r) => ({ testRate: r, baselineRate: r }));
    const healthy = (
      variant: HealthyVariant,
      k: number,
      mix: FlightMix,
      extra: Partial<Job> = {},
      flight: Partial<FlightSpec> = {},
    ) =>
      jobs.push({
        id: `af${id}/healthy/${variant}${k >= 10 ? `-${Math.floor(k / 10) + 1}` : ""}`,
        airframe: id,
        group: "healthy",
        variant,
        severity: 0,
        flight: { seed: 100 * id + k, durationS: o.durationS, mix, ...flight },
        damage: null,
        style: airframe.headerStyle,
        pairs: same,
        ...extra,
      });
    o.healthy.forEach((v) => {
      const k = HEALTHY_VARIANTS.indexOf(v);
      // Two flights each of the repeat and of another phase mix (the second with the mix the damage
      // flights fly most), so healthy flying is sampled as widely as damaged flying.
      if (v === "repeat") {
        healthy(v, k, "baseline");
        healthy(v, 10 + k, "baseline");
      } else if (v === "hard") healthy(v, k, "hard");
      else if (v === "phase-mix") {
        healthy(v, k, "wash-heavy");
        healthy(v, 10 + k, "freestyle");
      } else if (v === "dropout")
        healthy(
          v,
          k,
          "race",
          {},
          { dropouts: { motor: 1 + ((id * 3) % 4), bursts: 5, minS: 0.1, maxS: 0.8 } },
        );
      else if (v === "other-rate")
        healthy(v, k, "race", {
          pairs: o.rates.map((r) => ({ testRate: otherRate(r), baselineRate: r })),
        });
      // The same flight as the repeat, written with another header: only the file format differs.
      else healthy(v, 0, "baseline", { style: otherStyle(airframe.headerStyle) });
    });
    o.classes.forEach((kind) => {
      // The three severities of a class fly the same flight with the damage in the same place, so
      // only the damage's size differs between them. Seeds follow the class, not its place in the list.
      const c = DAMAGE_CLASSES.indexOf(kind);
      const seed = 1000 * id + 10 * c;
      const mix = TEST_MIXES[(id + c) % TEST_MIXES.length] ?? "race";
      // Every third airframe's ESC telemetry drops out now and then on one motor in its damage
      // flights too, as real logs sometimes do.
      const dropouts =
        id % 3 === 0 ? { dropouts: { motor: 1 + (c % 4), bursts: 3, minS: 0.1, maxS: 0.5 } } : {};
      for (const severity of o.severities) {
        jobs.push({
          id: `af${id}/${kind}/s${severity}`,
          airframe: id,
          group: "damage",
          variant: kind,
          severity,
          flight: { seed, durationS: o.durationS, mix, ...dropouts },
          damage: { kind, severity, seed },
          style: airframe.headerStyle,
          pairs: same,
        });
      }
    });
  }
  return jobs;
}

/** Holds an assessment against the truth of its case. */
export function judge(truth: CaseTruth, a: Assessment): Verdict {
  const score = Number.isFinite(a.score) ? a.score : null;
  const base = { status: a.status, score };
  if (truth.kind === "healthy") {
    return {
      ...base,
      miss: false,
      falseAlarm: a.status === "inspect" || a.status === "ground",
      classRight: a.findings.length === 0,
      axisRight: null,
      freqRight: null,
      motorRight: null,
    };
  }
  const kind = truth.kind;
  const d = diagnose(a);
  const ofClass = d.filter((x) => x.classes.includes(kind));
  return {
    ...base,
    miss: a.status === "ok",
    falseAlarm: false,
    classRight: (d[0]?.classes ?? []).includes(kind),
    axisRight: truth.axes.length === 0 ? null : ofClass.some((x) => truth.axes.includes(x.axis)),
    freqRight:
      truth.freqsHz.length === 0
        ? null
        : ofClass.some((x) =>
            truth.freqsHz.some((f) => Math.abs(x.freqHz - f) <= FREQ_TOLERANCE * f),
          ),
    motorRight: truth.motor === undefined ? null : ofClass.some((x) => x.motor === truth.motor),
  };
}

async function analyseLog(
  log: LoggedLog,
  style: HeaderStyle,
  airframe: SimAirframe,
  note: string,
): Promise<LogAnalysis> {
  const written = writeLogCsv(log, style, {
    airframe: airframe.name,
    flownAt: "2026-11-28T14:05:00Z",
    note,
  });
  // As `compare` reads a file: the streaming reader and analyser, with the column map when the header is foreign.
  const { analysis } = await analyzeLog(bytesSource(written.bytes), {
    map: written.map ? parseColumnMap(written.map) : undefined,
  });
  return analysis;
}

/** Runs jobs, keeping each airframe's baseline analyses for the jobs after it. */
export class CaseRunner {
  private readonly baselines = new Map<string, Promise<LogAnalysis[]>>();
  private readonly options: MatrixOptions;

  constructor(options: MatrixOptions) {
    this.options = options;
  }

  private baseline(id: number, rate: number): Promise<LogAnalysis[]> {
    const key = `${id}@${rate}`;
    let b = this.baselines.get(key);
    if (!b) {
      b = this.makeBaselines(id).then((all) => all.get(rate) ?? []);
      this.baselines.set(key, b);
    }
    return b;
  }

  private readonly made = new Map<number, Promise<Map<number, LogAnalysis[]>>>();

  /** Two healthy flights of the baseline mix, logged at every rate of the matrix. */
  private makeBaselines(id: number): Promise<Map<number, LogAnalysis[]>> {
    let m = this.made.get(id);
    if (!m) {
      m = (async () => {
        const airframe = fleetAirframe(id);
        const byRate = new Map<number, LogAnalysis[]>();
        for (const k of [1, 2]) {
          const sim = simulateFlight(
            airframe,
            { seed: 100 * id + 90 + k, durationS: this.options.durationS, mix: "baseline" },
            null,
            this.options.rates,
          );
          for (const log of sim.logs) {
            const list = byRate.get(log.rateHz) ?? [];
            list.push(
              await analyseLog(log, airframe.headerStyle, airframe, `baseline flight ${k}`),
            );
            byRate.set(log.rateHz, list);
          }
        }
        return byRate;
      })();
      this.made.set(id, m);
    }
    return m;
  }

  async run(job: Job): Promise<CaseResult[]> {
    const airframe = fleetAirframe(job.airframe);
    const rates = [...new Set(job.pairs.map((p) => p.testRate))];
    const sim = simulateFlight(airframe, job.flight, job.damage, rates);
    const out: CaseResult[] = [];
    for (const pair of job.pairs) {
      const log = sim.logs.find((l) => l.rateHz === pair.testRate);
      const common = {
        id: job.id,
        airframe: job.airframe,
        group: job.group,
        variant: job.variant,
        severity: job.severity,
        testRate: pair.testRate,
        baselineRate: pair.baselineRate,
        style: job.style,
        truth: sim.truth,
      };
      try {
        if (!log) throw new Error(`no log at ${pair.testRate} Hz`);
        const analysis = await analyseLog(log, job.style, airframe, job.id);
        const assessment = compareAnalyses(
          analysis,
          await this.baseline(job.airframe, pair.baselineRate),
        );
        const classes = new Map(diagnose(assessment).map((d) => [d.finding, d.classes]));
        out.push({
          ...common,
          verdict: judge(sim.truth, assessment),
          findings: assessment.findings.map((f) => ({
            kind: f.kind,
            axis: f.axis,
            freqHz: f.freqHz,
            motor: f.motor,
            points: f.points,
            severity: f.severity,
            classes: classes.get(f) ?? [],
          })),
        });
      } catch (e) {
        // A case the engine could not read or compare is reported, never silently dropped.
        out.push({
          ...common,
          verdict: {
            status: "watch",
            score: null,
            miss: job.group === "damage",
            falseAlarm: false,
            classRight: false,
            axisRight: false,
            freqRight: false,
            motorRight: false,
          },
          findings: [],
          error: e instanceof Error ? e.message : String(e),
        });
      }
    }
    return out;
  }
}

export interface HealthyRow {
  variant: HealthyVariant;
  n: number;
  statuses: Record<Status, number>;
  falseAlarms: number;
  unscored: number;
}

export interface DamageRow {
  kind: DamageClass;
  severity: Severity;
  n: number;
  statuses: Record<Status, number>;
  misses: number;
  classRight: number;
  /** k of n applicable, or null when the class has no axis/frequency/motor. */
  axisRight: [number, number] | null;
  freqRight: [number, number] | null;
  motorRight: [number, number] | null;
  meanScore: number;
}

export interface MonotoneRow {
  kind: DamageClass;
  /** Airframe × rate groups with all three severities. */
  groups: number;
  strictlyFalling: number;
}

export interface MatrixSummary {
  cases: number;
  healthy: HealthyRow[];
  damage: DamageRow[];
  monotone: MonotoneRow[];
  /** At the strongest severity, per class and log rate: cases right in class, axis, frequency and motor. */
  strongestByRate: { kind: DamageClass; rate: number; right: number; n: number }[];
  errors: { id: string; testRate: number; error: string }[];
  done: {
    falseAlarms: number;
    strongestWrong: number;
    strongestCases: number;
    notFalling: number;
    fallingGroups: number;
    pass: boolean;
  };
}

function emptyStatuses(): Record<Status, number> {
  return { ok: 0, watch: 0, inspect: 0, ground: 0 };
}

function ratio(
  results: CaseResult[],
  pick: (v: Verdict) => boolean | null,
): [number, number] | null {
  const applicable = results.filter((r) => pick(r.verdict) !== null);
  if (applicable.length === 0) return null;
  return [applicable.filter((r) => pick(r.verdict) === true).length, applicable.length];
}

/** Right in everything the truth of the case names. */
export function fullyRight(v: Verdict): boolean {
  return (
    !v.miss &&
    v.classRight &&
    v.axisRight !== false &&
    v.freqRight !== false &&
    v.motorRight !== false
  );
}

export function summarise(results: CaseResult[], options: MatrixOptions): MatrixSummary {
  const healthy: HealthyRow[] = options.healthy.map((variant) => {
    const rs = results.filter((r) => r.group === "healthy" && r.variant === variant);
    const statuses = emptyStatuses();
    for (const r of rs) statuses[r.verdict.status]++;
    return {
      variant,
      n: rs.length,
      statuses,
      falseAlarms: rs.filter((r) => r.verdict.falseAlarm).length,
      unscored: rs.filter((r) => r.verdict.score === null).length,
    };
  });
  const damage: DamageRow[] = [];
  for (const kind of options.classes) {
    for (const severity of options.severities) {
      const rs = results.filter(
        (r) => r.group === "damage" && r.variant === kind && r.severity === severity,
      );
      const statuses = emptyStatuses();
      for (const r of rs) statuses[r.verdict.status]++;
      const scores = rs.map((r) => r.verdict.score ?? 0);
      damage.push({
        kind,
        severity,
        n: rs.length,
        statuses,
        misses: rs.filter((r) => r.verdict.miss).length,
        classRight: rs.filter((r) => r.verdict.classRight).length,
        axisRight: ratio(rs, (v) => v.axisRight),
        freqRight: ratio(rs, (v) => v.freqRight),
        motorRight: ratio(rs, (v) => v.motorRight),
        meanScore: scores.length ? scores.reduce((s, x) => s + x, 0) / scores.length : Number.NaN,
      });
    }
  }
  const monotone: MonotoneRow[] = options.classes.map((kind) => {
    let groups = 0;
    let falling = 0;
    for (const id of options.airframes) {
      for (const rate of options.rates) {
        const by = SEVERITIES.map((s) =>
          results.find(
            (r) =>
              r.group === "damage" &&
              r.variant === kind &&
              r.airframe === id &&
              r.testRate === rate &&
              r.severity === s,
          ),
        );
        if (by.some((r) => !r)) continue;
        groups++;
        const sc = by.map((r) => r?.verdict.score ?? null);
        const [a, b, c] = sc;
        if (
          typeof a === "number" &&
          typeof b === "number" &&
          typeof c === "number" &&
          a > b &&
          b > c
        )
          falling++;
      }
    }
    return { kind, groups, strictlyFalling: falling };
  });
  const strongest = Math.max(...options.severities);
  const strongestByRate = options.classes.flatMap((kind) =>
    options.rates.map((rate) => {
      const rs = results.filter(
        (r) =>
          r.group === "damage" &&
          r.variant === kind &&
          r.severity === strongest &&
          r.testRate === rate,
      );
      return { kind, rate, right: rs.filter((r) => fullyRight(r.verdict)).length, n: rs.length };
    }),
  );
  const falseAlarms = healthy.reduce((s, h) => s + h.falseAlarms, 0);
  const strongestCases = strongestByRate.reduce((s, x) => s + x.n, 0);
  const strongestWrong = strongestCases - strongestByRate.reduce((s, x) => s + x.right, 0);
  const fallingGroups = monotone.reduce((s, m) => s + m.groups, 0);
  const notFalling = fallingGroups - monotone.reduce((s, m) => s + m.strictlyFalling, 0);
  const errors = results
    .filter((r) => r.error)
    .map((r) => ({ id: r.id, testRate: r.testRate, error: r.error ?? "" }));
  return {
    cases: results.length,
    healthy,
    damage,
    monotone,
    strongestByRate,
    errors,
    done: {
      falseAlarms,
      strongestWrong,
      strongestCases,
      notFalling,
      fallingGroups,
      pass: falseAlarms === 0 && strongestWrong === 0 && notFalling === 0 && errors.length === 0,
    },
  };
}

function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? "").length)));
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (i === 0 ? c.padEnd(widths[i] ?? 0) : c.padStart(widths[i] ?? 0)))
      .join("  ");
  return [line(header), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)].join("\n");
}

const frac = (x: [number, number] | null) => (x ? `${x[0]}/${x[1]}` : "–");

/** The confusion tables as plain text. */
/** How many cases ended at each status, in the tables' column order. */
function statusCells(statuses: Record<Status, number>): string[] {
  return STATUS_ORDER.map((x) => String(statuses[x]));
}

export function formatSummary(s: MatrixSummary, options: MatrixOptions): string {
  const out: string[] = [];
  out.push(
    `validation matrix: ${s.cases} logs · airframes ${options.airframes.join(", ")} · rates ${options.rates.map((r) => `${r / 1000} kHz`).join(", ")} · ${options.durationS} s flights`,
  );
  out.push("");
  out.push("healthy variants (a false alarm is inspect or ground)");
  out.push(
    table(
      ["variant", "n", ...STATUS_ORDER, "false alarms"],
      s.healthy.map((h) => [
        h.variant,
        String(h.n),
        ...statusCells(h.statuses),
        String(h.falseAlarms),
      ]),
    ),
  );
  out.push("");
  out.push(
    "damage (miss: scored ok · class ok: the finding with most points names the class · axis, freq (±5 %), motor ok: some finding of that class is right · –: not part of that class's truth)",
  );
  out.push(
    table(
      [
        "class",
        "sev",
        "n",
        ...STATUS_ORDER,
        "miss",
        "class ok",
        "axis ok",
        "freq ok",
        "motor ok",
        "mean score",
      ],
      s.damage.map((d) => [
        d.kind,
        String(d.severity),
        String(d.n),
        ...statusCells(d.statuses),
        String(d.misses),
        `${d.classRight}/${d.n}`,
        frac(d.axisRight),
        frac(d.freqRight),
        frac(d.motorRight),
        Number.isFinite(d.meanScore) ? d.meanScore.toFixed(0) : "–",
      ]),
    ),
  );
  out.push("");
  out.push("scores strictly falling with severity (airframe × rate groups)");
  out.push(
    table(
      ["class", "groups", "falling"],
      s.monotone.map((m) => [m.kind, String(m.groups), String(m.strictlyFalling)]),
    ),
  );
  out.push("");
  out.push("strongest severity fully right (class, axis, freq, motor), by log rate");
  const rates = options.rates;
  out.push(
    table(
      ["class", ...rates.map((r) => `${r / 1000} kHz`)],
      options.classes.map((kind) => [
        kind,
        ...rates.map((rate) => {
          const x = s.strongestByRate.find((y) => y.kind === kind && y.rate === rate);
          return x ? `${x.right}/${x.n}` : "–";
        }),
      ]),
    ),
  );
  if (s.errors.length > 0) {
    out.push("");
    out.push(`errors (${s.errors.length}):`);
    for (const e of s.errors.slice(0, 20)) out.push(`  ${e.id} @ ${e.testRate} Hz: ${e.error}`);
  }
  out.push("");
  const d = s.done;
  out.push(
    `done when: false inspect/ground on healthy ${d.falseAlarms} (want 0) · strongest severity not fully right ${d.strongestWrong}/${d.strongestCases} (want 0) · not strictly falling ${d.notFalling}/${d.fallingGroups} (want 0) → ${d.pass ? "PASS" : "FAIL"}`,
  );
  return out.join("\n") + "\n";
}
