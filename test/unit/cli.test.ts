import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { runCli } from "@/lib/cli/run";
import { demoCsv } from "@/lib/demo/demo-csv";

const dir = mkdtempSync(join(tmpdir(), "heatcheck-cli-"));
const good = join(dir, "good.csv");
const good2 = join(dir, "good2.csv");
const prop = join(dir, "prop.csv");

async function cli(...argv: string[]) {
  let stdout = "";
  let stderr = "";
  const code = await runCli(argv, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t) });
  return { code, stdout, stderr };
}

beforeAll(() => {
  writeFileSync(good, demoCsv({ seed: 31, durationS: 30 }, { airframe: "T-1" }));
  writeFileSync(good2, demoCsv({ seed: 32, durationS: 30 }, { airframe: "T-1" }));
  writeFileSync(
    prop,
    demoCsv({ seed: 33, durationS: 30, scenario: "bent-prop", severity: 3 }, { airframe: "T-1" }),
  );
});

describe("heatcheck analyze", () => {
  it("--json has the documented shape", async () => {
    const r = await cli("analyze", good, "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as Record<string, unknown> & {
      axes: Record<string, Record<string, unknown[]>>;
      throttleBands: unknown[];
    };
    for (const key of ["sampleRateHz", "durationS", "samples", "gaps", "axes", "throttleBands"])
      expect(j).toHaveProperty(key);
    for (const axis of ["roll", "pitch", "yaw"]) {
      const a = j.axes[axis] ?? {};
      expect(a.freqHz?.length).toBe(a.psd?.length);
      expect(a.peaks?.[0]).toMatchObject({
        freqHz: expect.any(Number),
        psd: expect.any(Number),
        prominenceDb: expect.any(Number),
        kind: expect.stringMatching(/structural|motor|unclassified/),
      });
      expect(a.bands?.length).toBeGreaterThan(5);
    }
    expect(j.sampleRateHz).toBe(4000);
  });
  it("prints a readable table without --json", async () => {
    const r = await cli("analyze", good, "--window", "hamming", "--nperseg", "1024");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/hamming window, 1024-sample segments \(3\.91 Hz bins\)/);
    expect(r.stdout).toMatch(/Peaks \(prominence ≥ 6 dB/);
  });
  it("exit 1 with one sentence for bad input, 2 for bad usage", async () => {
    const missing = await cli("analyze", join(dir, "nope.csv"));
    expect(missing).toMatchObject({ code: 1, stdout: "" });
    expect(missing.stderr).toMatch(/^heatcheck: cannot read .*nope\.csv: no such file\n$/);
    writeFileSync(join(dir, "bad.csv"), "time_us,gyro_roll,gyro_pitch,gyro_yaw\n0,1,2,x\n");
    const bad = await cli("analyze", join(dir, "bad.csv"));
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/line 2, column 4 \(gyro_yaw\): expected a number, found "x"/);
    expect((await cli("analyze", good, "--nperseg", "1000")).code).toBe(2);
    expect((await cli("analyze", good, "--bogus")).stderr).toMatch(/unknown option --bogus/);
    expect((await cli("frobnicate")).code).toBe(2);
    expect((await cli("compare", prop)).stderr).toMatch(/needs at least one --baseline/);
  });
});

describe("analyze --json keeps the PSD's precision", () => {
  // Source: scipy.signal.welch, fixtures by test/fixtures/make_welch_fixtures.py. The fixture's
  // samples go through the whole command (CSV writer with round-trip decimal digits, the reader,
  // the JSON output); tolerance ≤ 1e-9 relative wherever scipy's value is above 1e-12 of its maximum.
  const fixtures = JSON.parse(readFileSync("test/fixtures/welch-scipy.json", "utf8")) as {
    cases: {
      name: string;
      fs: number;
      options: Record<string, string | number>;
      x: number[];
      freqHz: number[];
      psd: number[];
    }[];
  };
  it.each(["resonance-4k-hann-2048", "two-tones-1k-hann-256", "hamming-2k-512-75pct"])(
    "%s: ≤ 1e-9 relative to scipy",
    async (name) => {
      const c = fixtures.cases.find((x) => x.name === name);
      if (!c) throw new Error(`fixture ${name} missing`);
      const file = join(dir, `${name}.csv`);
      const stepUs = 1e6 / c.fs;
      const rows = c.x.map((v, i) => `${i * stepUs},${v},${v},${v}`);
      writeFileSync(file, `time_us,gyro_roll,gyro_pitch,gyro_yaw\n${rows.join("\n")}\n`);
      const nperseg = Number(c.options.nperseg);
      const overlap = c.options.noverlap === undefined ? 0.5 : Number(c.options.noverlap) / nperseg;
      const window = c.options.window === "hamming" ? "hamming" : "hann";
      const r = await cli(
        "analyze",
        file,
        "--json",
        "--nperseg",
        String(nperseg),
        "--overlap",
        String(overlap),
        "--window",
        window,
      );
      expect(r.stderr).toBe("");
      const j = JSON.parse(r.stdout) as { axes: { roll: { freqHz: number[]; psd: number[] } } };
      expect(j.axes.roll.psd.length).toBe(c.psd.length);
      const top = Math.max(...c.psd);
      let worst = 0;
      c.psd.forEach((ref, k) => {
        if (ref > 1e-12 * top)
          worst = Math.max(worst, Math.abs((j.axes.roll.psd[k] ?? Number.NaN) - ref) / ref);
        expect(
          Math.abs((j.axes.roll.freqHz[k] ?? Number.NaN) - (c.freqHz[k] ?? 0)),
        ).toBeLessThanOrEqual(1e-9 * c.fs);
      });
      expect(worst).toBeLessThanOrEqual(1e-9);
    },
  );
});

describe("heatcheck compare", () => {
  it("--json has the documented shape and names the bent prop's motor", async () => {
    const r = await cli("compare", prop, "--baseline", good, "--baseline", good2, "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as {
      score: number;
      status: string;
      findings: { kind: string; motor?: number; text: string; axis: string; freqHz: number }[];
      notCompared: unknown[];
    };
    expect(j.score).toBeLessThan(80);
    expect(["inspect", "ground"]).toContain(j.status);
    const f = j.findings.find((x) => x.kind === "motor-order");
    expect(f?.motor).toBe(3);
    expect(f?.text).toMatch(/motor 3 \(rear-right\)/);
    expect(Array.isArray(j.notCompared)).toBe(true);
  });
  it("a healthy log against its own airframe's baseline is ok, with the decision-aid note", async () => {
    const r = await cli("compare", good2, "--baseline", good);
    expect(r.stdout).toMatch(/score \d+ \/ 100 · ok/);
    expect(r.stdout).toMatch(/decision aid, not an airworthiness certificate/);
  });
});

describe("the CLI as a process, as the README types it (npx heatcheck: the bundled bin, two threads)", () => {
  it("the README's compare example prints what the README says it prints", () => {
    // The commands and the quoted result are read from the README itself, so that it stays true:
    // when the engine's words or numbers change, this fails until the README shows the new ones.
    const readme = readFileSync("README.md", "utf8");
    const example =
      /```sh\n(npx heatcheck demo-log good\.csv[^`]*?)```\s+prints a score with "what took points off", here `([^`]+)` and `([^`]+)`/.exec(
        readme,
      );
    expect(example).not.toBeNull();
    const [, commands = "", scoreLine = "", findingLine = ""] = example ?? [];
    const oneSpaced = (t: string) => t.replace(/\s+/g, " ").trim();
    const where = mkdtempSync(join(tmpdir(), "heatcheck-readme-"));
    let out = "";
    for (const command of commands.trim().split("\n")) {
      // As typed in the heatcheck folder; the files go to a temporary folder instead of it.
      const [npx, ...args] = command.trim().split(/\s+/);
      expect(npx).toBe("npx");
      out = execFileSync(
        "npx",
        args.map((a) => (a.endsWith(".csv") ? join(where, a) : a)),
        { encoding: "utf8" },
      );
    }
    expect(oneSpaced(out)).toContain(oneSpaced(scoreLine));
    expect(oneSpaced(out)).toContain(oneSpaced(findingLine));
  }, 120_000);

  it("analyze --json through npx heatcheck gives the same numbers as in-process", async () => {
    const out = execFileSync("npx", ["heatcheck", "analyze", good, "--json"], { encoding: "utf8" });
    const inProcess = JSON.parse((await cli("analyze", good, "--json")).stdout) as {
      axes: { pitch: { peaks: { freqHz: number }[]; psd: number[] } };
    };
    const viaProcess = JSON.parse(out) as typeof inProcess;
    expect(viaProcess.axes.pitch.peaks).toEqual(inProcess.axes.pitch.peaks);
    expect(viaProcess.axes.pitch.psd).toEqual(inProcess.axes.pitch.psd);
    const r = spawnSync("npx", ["heatcheck", "analyze", join(dir, "nope.csv")], {
      encoding: "utf8",
    });
    expect(r.status).toBe(1);
    expect(r.stdout).toBe("");
  });
});
