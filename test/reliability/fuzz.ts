/**
 * Bounded, seeded fuzzing of the reader and analyser: small valid logs are mutated (bytes flipped,
 * inserted, deleted, duplicated, separators and line endings inserted, lines swapped or repeated,
 * cells replaced, the file cut) and each result is read in random chunk sizes. Every outcome must
 * be a result or a domain error with a sentence — never another exception — and one case in four
 * is read again in other chunk sizes and must give the same outcome.
 *
 *     npm run fuzz                  # 100,000 mutations (prints a summary)
 *     npm run fuzz -- 5000 42       # count and seed
 */
import { mulberry32, type Random } from "../../lib/demo/random";
import { buildCorpus, type CorpusCase } from "./corpus";
import { runCaseInProcess, type Outcome } from "./run-case";

export interface FuzzReport {
  runs: number;
  accepted: number;
  rejected: number;
  /** Outcomes that are neither: an exception that is not a domain error, or chunk-dependent results. */
  failures: { seed: number; what: string; detail: string }[];
  slowestMs: number;
  totalMs: number;
}

const enc = new TextEncoder();

/** Small valid logs to mutate: short so that thousands of runs take seconds. */
function bases(): CorpusCase[] {
  const rows = (
    n: number,
    rate: number,
    eol = "\n",
    header = "time_us,gyro_roll,gyro_pitch,gyro_yaw,throttle,rpm_1,rpm_2",
  ) => {
    const rand = mulberry32(n + rate);
    let s = `# airframe: Fuzz-01${eol}# flown_at: 2026-11-28T14:05:00Z${eol}${header}${eol}`;
    for (let k = 0; k < n; k++) {
      const t = Math.round((k * 1e6) / rate);
      s += `${t},${(20 * Math.sin(k * 0.9) + rand()).toFixed(3)},${(10 * Math.cos(k * 0.4)).toFixed(3)},${(rand() - 0.5).toFixed(3)},0.4${k % 10},21000,21050${eol}`;
    }
    return enc.encode(s);
  };
  const accepted = { outcome: "accepted" } as const;
  const corpusPicks = buildCorpus().filter((c) =>
    ["foreign-map", "quoted-cells", "decimal-commas", "one-gap"].includes(c.id),
  );
  return [
    { id: "fuzz-lf", family: "fuzz", what: "", bytes: rows(1100, 1000), expect: accepted },
    {
      id: "fuzz-crlf",
      family: "fuzz",
      what: "",
      bytes: rows(1100, 1000, "\r\n"),
      expect: accepted,
    },
    { id: "fuzz-cr", family: "fuzz", what: "", bytes: rows(1100, 1000, "\r"), expect: accepted },
    { id: "fuzz-2k", family: "fuzz", what: "", bytes: rows(2100, 2000), expect: accepted },
    ...corpusPicks,
  ];
}

const INSERTS = [
  ",",
  "\n",
  "\r",
  "\r\n",
  '"',
  "\u0000",
  "#",
  " ",
  "-",
  ".",
  "e",
  "9",
  ",,",
  "\uFEFF",
  "é",
  "\t",
  ";",
];

function mutate(input: Uint8Array, rand: Random): { bytes: Uint8Array; what: string } {
  let bytes = input;
  const steps = 1 + Math.floor(rand() * 4);
  const what: string[] = [];
  const pos = () => Math.floor(rand() * Math.max(1, bytes.length));
  for (let s = 0; s < steps; s++) {
    const op = Math.floor(rand() * 9);
    if (op === 0) {
      const out = bytes.slice();
      const flips = 1 + Math.floor(rand() * 16);
      for (let k = 0; k < flips; k++) out[pos()] = Math.floor(rand() * 256);
      bytes = out;
      what.push(`flip ${flips}`);
    } else if (op === 1) {
      const at = pos();
      const ins = enc.encode(INSERTS[Math.floor(rand() * INSERTS.length)] ?? ",");
      bytes = join(bytes.subarray(0, at), ins, bytes.subarray(at));
      what.push(`insert at ${at}`);
    } else if (op === 2) {
      const at = pos();
      const len = Math.floor(rand() * 400);
      bytes = join(bytes.subarray(0, at), bytes.subarray(Math.min(bytes.length, at + len)));
      what.push(`delete ${len} at ${at}`);
    } else if (op === 3) {
      const at = pos();
      const len = Math.floor(rand() * 2000);
      bytes = join(bytes.subarray(0, at), bytes.subarray(at, at + len), bytes.subarray(at));
      what.push(`duplicate ${len} at ${at}`);
    } else if (op === 4) {
      bytes = bytes.subarray(0, pos());
      what.push("cut");
    } else if (op === 5 || op === 6) {
      const text = new TextDecoder().decode(bytes);
      const lines = text.split("\n");
      const i = Math.floor(rand() * lines.length);
      const j = Math.floor(rand() * lines.length);
      if (op === 5) {
        [lines[i], lines[j]] = [lines[j] ?? "", lines[i] ?? ""];
        what.push(`swap lines ${i + 1} and ${j + 1}`);
      } else {
        const times = 1 + Math.floor(rand() * 50);
        lines.splice(i, 0, ...Array.from({ length: times }, () => lines[i] ?? ""));
        what.push(`repeat line ${i + 1} ${times}×`);
      }
      bytes = enc.encode(lines.join("\n"));
    } else if (op === 7) {
      const text = new TextDecoder().decode(bytes);
      const cells = text.split(",");
      const i = Math.floor(rand() * cells.length);
      const junk =
        ["", "abc", "1e400", "-", "NaN", "0x1", "1,5", "99999999999999999999", '"', "  "][
          Math.floor(rand() * 10)
        ] ?? "";
      cells[i] = junk;
      bytes = enc.encode(cells.join(","));
      what.push(`cell ${i} = ${JSON.stringify(junk)}`);
    } else {
      const at = pos();
      const len = 1 + Math.floor(rand() * 64);
      const noise = new Uint8Array(len).map(() => Math.floor(rand() * 256));
      bytes = join(bytes.subarray(0, at), noise, bytes.subarray(at));
      what.push(`noise ${len} at ${at}`);
    }
  }
  return { bytes, what: what.join("; ") };
}

function join(...parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

function clean(o: Outcome): string | null {
  if (o.outcome === "unexpected") return o.message;
  if (o.outcome === "rejected" && (o.message.length < 10 || /\bat .*\.ts:\d+/.test(o.message)))
    return `unclear message: ${o.message}`;
  return null;
}

/** Runs `count` mutations from `seed`; never throws for a finding, it reports it. */
export async function fuzzReader(count: number, seed = 1): Promise<FuzzReport> {
  const sources = bases();
  const report: FuzzReport = {
    runs: 0,
    accepted: 0,
    rejected: 0,
    failures: [],
    slowestMs: 0,
    totalMs: 0,
  };
  const start = performance.now();
  for (let n = 0; n < count; n++) {
    const caseSeed = seed * 1_000_003 + n;
    const rand = mulberry32(caseSeed);
    const base = sources[Math.floor(rand() * sources.length)] ?? sources[0];
    if (!base) break;
    const { bytes, what } = mutate(base.bytes, rand);
    const c: CorpusCase = { ...base, bytes };
    const sizeSeed = Math.floor(rand() * 2 ** 31);
    const sizes = mulberry32(sizeSeed);
    const t = performance.now();
    const o = await runCaseInProcess(c, () => Math.exp(sizes() * Math.log(64 * 1024)));
    report.slowestMs = Math.max(report.slowestMs, performance.now() - t);
    report.runs++;
    if (o.outcome === "accepted") report.accepted++;
    else if (o.outcome === "rejected") report.rejected++;
    const problem = clean(o);
    if (problem) {
      report.failures.push({ seed: caseSeed, what: `${base.id}: ${what}`, detail: problem });
      continue;
    }
    if (n % 4 === 0) {
      const again = await runCaseInProcess(c, () => 1 << 20);
      if (JSON.stringify(again) !== JSON.stringify(o)) {
        report.failures.push({
          seed: caseSeed,
          what: `${base.id}: ${what}`,
          detail: `chunk-dependent: ${JSON.stringify(o)} vs ${JSON.stringify(again)}`,
        });
      }
    }
  }
  report.totalMs = performance.now() - start;
  return report;
}

if (process.argv[1] && /fuzz\.ts$/.test(process.argv[1])) {
  const count = Number(process.argv[2] ?? 100_000);
  const seed = Number(process.argv[3] ?? 1);
  const r = await fuzzReader(count, seed);
  process.stdout.write(
    `${r.runs} mutations (seed ${seed}): ${r.accepted} accepted, ${r.rejected} rejected with a sentence, ${r.failures.length} failures; slowest ${r.slowestMs.toFixed(0)} ms, total ${(r.totalMs / 1000).toFixed(1)} s\n`,
  );
  for (const f of r.failures.slice(0, 20))
    process.stdout.write(`  seed ${f.seed} (${f.what}): ${f.detail}\n`);
  process.exitCode = r.failures.length > 0 ? 1 : 0;
}
