/**
 * The reader half of the reliability suite: every case of the generated malformed corpus
 * (corpus.ts; the table is corpus-table.md) through the reader and analyser, again in random chunk
 * sizes, through the CLI's own entry (runCli), and through the CLI as a process exactly as the
 * README types it (`npx heatcheck analyze …`, the bundled bin). Expected outcomes come from the reading rules the
 * README states; each is checked exactly (sample counts, gaps, dropped rows, the error code, the
 * sentence fragment, line and column), sample rates to the relative tolerance the case states.
 *
 * The process run covers one case per family and eight named ones in `npm test`
 * (each process costs about 1–2 s on the 2-core machine); HEATCHECK_CORPUS_FULL=1 (`npm run
 * corpus`) runs all of them.
 */
import { spawn } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli } from "@/lib/cli/run";
import { mulberry32 } from "@/lib/demo/random";
import { buildCorpus, corpusTable, writeCorpus, type CorpusCase, type Expected } from "./corpus";
import { runCaseInProcess, type Outcome } from "./run-case";

const cases = buildCorpus();
const dir = mkdtempSync(join(tmpdir(), "heatcheck-corpus-"));
const fileOf = (c: CorpusCase) => join(dir, `${c.id}.csv`);

beforeAll(() => writeCorpus(dir, cases));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function listing(): string {
  return readdirSync(dir)
    .sort()
    .map((f) => `${f}:${statSync(join(dir, f)).size}`)
    .join("\n");
}

function expectOutcome(c: CorpusCase, o: Outcome): void {
  const e: Expected = c.expect;
  const label = `${c.id}: ${JSON.stringify(o).slice(0, 400)}`;
  if (e.outcome === "accepted") {
    expect(o.outcome, label).toBe("accepted");
    if (o.outcome !== "accepted") return;
    if (e.samples !== undefined) expect(o.samples, label).toBe(e.samples);
    if (e.gaps !== undefined) expect(o.gaps, label).toBe(e.gaps);
    if (e.droppedRows !== undefined) expect(o.droppedRows, label).toBe(e.droppedRows);
    if (e.sampleRateHz !== undefined) {
      // Tolerance as the case states it (0: the rate must come out exact).
      expect(Math.abs(o.sampleRateHz / e.sampleRateHz - 1), label).toBeLessThanOrEqual(
        e.rateTolerance ?? 0,
      );
    }
    return;
  }
  expect(o.outcome, label).toBe("rejected");
  if (o.outcome !== "rejected") return;
  expect(o.stage, label).toBe(e.stage);
  expect(o.code, label).toBe(e.code);
  expect(o.message, label).toContain(e.sentence);
  expect(o.line, label).toBe(e.line);
  if (e.column !== undefined) expect(o.column, label).toBe(e.column);
}

describe("the malformed corpus", () => {
  it("has at least 200 cases, and its committed table is up to date", () => {
    expect(cases.length).toBeGreaterThanOrEqual(200);
    expect(readFileSync(new URL("./corpus-table.md", import.meta.url), "utf8")).toBe(
      corpusTable(cases),
    );
  });

  it("every case through the reader and analyser gives its expected outcome (1 MiB reads)", async () => {
    for (const c of cases) expectOutcome(c, await runCaseInProcess(c));
  });

  it("the outcome and message do not depend on the chunk sizes (random sizes from 1 byte to 128 KiB)", async () => {
    const rand = mulberry32(2026);
    for (const c of cases) {
      const whole = await runCaseInProcess(c);
      // Log-uniform sizes so that tiny and large chunks both occur in every file.
      const seed = Math.floor(rand() * 2 ** 31);
      const r = mulberry32(seed);
      const pieces = await runCaseInProcess(c, () => Math.exp(r() * Math.log(128 * 1024)));
      expect(pieces, `${c.id} (chunk seed ${seed})`).toEqual(whole);
    }
  });
});

interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

function cliArgs(c: CorpusCase): string[] {
  return [
    "analyze",
    fileOf(c),
    "--json",
    ...(c.map ? ["--map", c.map] : []),
    ...(c.maxMb ? ["--max-mb", String(c.maxMb)] : []),
  ];
}

/** What the CLI must have done for a case: exit code, stdout and stderr. */
function expectCli(c: CorpusCase, r: CliRun): void {
  const e = c.expect;
  const label = `${c.id}: exit ${r.code}, stderr ${r.stderr.slice(0, 300)}`;
  if (e.outcome === "accepted") {
    expect(r.code, label).toBe(0);
    const j = JSON.parse(r.stdout) as { samples: number; gaps: unknown[] };
    if (e.samples !== undefined) expect(j.samples, label).toBe(e.samples);
    expect(r.stderr, label).toBe("");
    return;
  }
  // Exit 1: the input could not be used, one sentence on stderr, nothing on stdout (README).
  expect(r.code, label).toBe(1);
  expect(r.stdout, label).toBe("");
  const lines = r.stderr.split("\n").filter((l) => l !== "");
  expect(lines, label).toHaveLength(1);
  const where = [
    e.line !== undefined ? `line ${e.line}` : "",
    e.column !== undefined ? `column ${e.column}` : "",
  ]
    .filter(Boolean)
    .join(", ");
  // The map is refused before the file is opened, so its message names no file.
  const prefix =
    e.stage === "map" ? "heatcheck: " : `heatcheck: ${fileOf(c)}: ${where ? `${where}` : ""}`;
  expect(lines[0]?.startsWith(prefix), label).toBe(true);
  expect(lines[0], label).toContain(e.sentence);
  expect(lines[0], label).not.toMatch(/unexpected failure|\bat .*\.ts:\d+/);
}

describe("the corpus through the CLI", () => {
  it("runCli (the function the heatcheck command runs) answers every case with its exit code and sentence, writing nothing", async () => {
    const before = listing();
    for (const c of cases) {
      let stdout = "";
      let stderr = "";
      const code = await runCli(cliArgs(c), {
        stdout: (t) => (stdout += t),
        stderr: (t) => (stderr += t),
      });
      expectCli(c, { code, stdout, stderr });
    }
    expect(listing()).toBe(before);
  });

  const full = process.env.HEATCHECK_CORPUS_FULL === "1";
  const seen = new Set<string>();
  const chosen = full
    ? cases
    : cases.filter((c) => {
        const first = !seen.has(c.family);
        seen.add(c.family);
        return (
          first ||
          [
            "cr-only",
            "many-gaps",
            "rate-50k",
            "gzip",
            "utf16le-bom",
            "header-2mib",
            "decimal-commas",
            "map-twice-column",
          ].includes(c.id)
        );
      });

  it(
    `\`npx heatcheck analyze\` as a process: ${full ? "every case" : `${chosen.length} cases (one per family and eight named ones)`}, exit code, stderr, nothing written`,
    { timeout: 900_000 },
    async () => {
      // The bin rebuilds its bundle when lib/ is newer: let one run do that before two run at once.
      await npxHeatcheck(["help"]);
      const before = listing();
      const queue = [...chosen];
      // Two at a time: the machine has two cores.
      await Promise.all(
        [0, 1].map(async () => {
          for (let c = queue.shift(); c; c = queue.shift())
            expectCli(c, await npxHeatcheck(cliArgs(c)));
        }),
      );
      expect(listing()).toBe(before);
    },
  );
});

function npxHeatcheck(args: string[]): Promise<CliRun> {
  return new Promise((resolve, reject) => {
    const p = spawn("npx", ["heatcheck", ...args], { stdio: ["ignore", "pipe", "pipe"] });
    let stdout = "";
    let stderr = "";
    p.stdout.on("data", (d: Buffer) => (stdout += d.toString()));
    p.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    const timer = setTimeout(() => p.kill("SIGKILL"), 120_000);
    p.on("error", reject);
    p.on("close", (code) => {
      clearTimeout(timer);
      resolve({ code: code ?? -1, stdout, stderr });
    });
  });
}

describe("the head reader of the upload path follows the same rules", () => {
  it("readLogHead refuses exactly the cases the reader refuses before or at the header, with the same sentence", async () => {
    const { readLogHead } = await import("@/lib/logs/sniff");
    const { chunked } = await import("./run-case");
    for (const c of cases) {
      if (c.expect.outcome === "rejected" && c.expect.stage === "map") continue;
      const full = await runCaseInProcess(c);
      let head: { line: number; proposal: { missing: string[] } } | null = null;
      let error: Error | null = null;
      try {
        head = await readLogHead(
          chunked(c.bytes, () => 64 * 1024),
          { maxBytes: (c.maxMb ?? 512) * 1024 * 1024 },
        );
      } catch (e) {
        error = e as Error;
      }
      if (error) {
        // Refused in the head: the whole reader refuses the file with the very same message.
        expect(full.outcome === "rejected" ? full.message : "accepted", c.id).toBe(error.message);
      } else {
        expect(head, c.id).not.toBeNull();
        // A head was found: the reader got past it, or refused the header's columns, which the head
        // reports as missing (or the case's map does not fit them); other refusals are about later lines.
        if (full.outcome === "rejected" && full.line !== undefined) {
          expect(full.line, c.id).toBeGreaterThanOrEqual(head?.line ?? 0);
          if (full.line === head?.line)
            expect(
              (head.proposal.missing.length > 0 || c.map !== undefined) &&
                /no column for|the map/.test(full.message),
              c.id,
            ).toBe(true);
        }
      }
    }
  });
});
