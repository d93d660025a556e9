import { describe, expect, it } from "vitest";
import { analyzeLog, bytesSource } from "@/lib/analysis/analyze-log";
import { demoCsv } from "@/lib/demo/demo-csv";
import { mulberry32 } from "@/lib/demo/random";
import { DomainError, LimitExceededError, LogFormatError } from "@/lib/errors";
import { parseColumnMap, type ColumnMap } from "@/lib/logs/columns";
import { MAX_LINE_BYTES } from "@/lib/logs/preamble";
import { LogReader, readLog, type LogInfo, type SampleBlock } from "@/lib/logs/read-log";

const enc = new TextEncoder();

/** Collects what the reader hands its sink. */
async function collect(text: string | Uint8Array, options = {}, chunk = 1 << 16) {
  const bytes = typeof text === "string" ? enc.encode(text) : text;
  let info: LogInfo | undefined;
  const roll: number[] = [];
  const time: number[] = [];
  const throttle: number[] = [];
  const rpm1: number[] = [];
  const gaps: number[] = [];
  const summary = await readLog(
    bytesSource(bytes, chunk),
    {
      begin: (i) => (info = i),
      block: (b: SampleBlock) => {
        for (let k = 0; k < b.length; k++) {
          roll.push(b.gyro[0][k] ?? NaN);
          time.push(b.timeS[k] ?? NaN);
          if (b.throttle) throttle.push(b.throttle[k] ?? NaN);
          if (b.rpm[0]) rpm1.push(b.rpm[0][k] ?? NaN);
        }
      },
      gap: () => gaps.push(roll.length),
    },
    options,
  );
  return { info, roll, time, throttle, rpm1, gaps, summary };
}

/** A canonical log of n rows at fs Hz with a recognisable roll signal. */
function canonical(n: number, fs = 1000, extra = ""): string {
  let s =
    "# airframe: Test-01\n# flown_at: 2026-11-28T14:05:00Z\n# note: bench\n# weather: dry\ntime_us,gyro_roll,gyro_pitch,gyro_yaw,throttle,rpm_1\n";
  for (let i = 0; i < n; i++)
    s += `${Math.round((i * 1e6) / fs)},${(i % 7) - 3},${i % 5},-1.5,0.4,20000\n`;
  return s + extra;
}

async function failure(text: string | Uint8Array, options = {}): Promise<Error> {
  try {
    await collect(text, options);
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected the log to be rejected");
}

describe("reading a canonical log", () => {
  it("reads metadata (unknown keys kept), every row, and the sample rate", async () => {
    const r = await collect(canonical(5000));
    expect(r.info?.metadata).toMatchObject({
      airframe: "Test-01",
      flown_at: "2026-11-28T14:05:00Z",
      note: "bench",
      weather: "dry",
    });
    expect(r.summary.samples).toBe(5000);
    expect(r.info?.sampleRateHz).toBeCloseTo(1000, 6);
    expect(r.roll.slice(0, 8)).toEqual([-3, -2, -1, 0, 1, 2, 3, -3]);
    expect(r.throttle[0]).toBeCloseTo(0.4, 12);
    expect(r.rpm1[10]).toBe(20000);
    expect(r.info?.guesses).toEqual([]);
  });

  it("gives the same samples whatever the chunk boundaries (1, 3 and 64 KiB bytes)", async () => {
    const text = canonical(600) + "5999000,1,2,3,0.4"; // last line without newline
    const whole = await collect(text);
    for (const chunk of [1, 3, 65536]) {
      const r = await collect(text, {}, chunk);
      expect(r.roll).toEqual(whole.roll);
    }
  });

  it("takes the median step despite jitter, and splits at gaps over 2.5 steps", async () => {
    const rand = mulberry32(3);
    let s = "time_us,gyro_roll,gyro_pitch,gyro_yaw\n";
    let t = 0;
    for (let i = 0; i < 6000; i++) {
      t += 500 + Math.round((rand() - 0.5) * 100); // 2 kHz with ±10 % jitter
      if (i === 3000) t += 5000; // a 5 ms hole
      s += `${t},1,2,3\n`;
    }
    const r = await collect(s);
    expect(r.info?.sampleRateHz).toBeGreaterThan(1950);
    expect(r.info?.sampleRateHz).toBeLessThan(2050);
    expect(r.summary.gaps).toHaveLength(1);
    expect(r.summary.gaps[0]?.line).toBe(3002);
    expect(r.gaps).toEqual([3000]);
  });

  it("drops a truncated last row and an empty cell, and says which lines", async () => {
    const text = canonical(3000).replace("\n1000,", "\n1000,,") + "3000000,1,2";
    const r = await collect(text);
    expect(r.summary.droppedRows).toBe(2);
    expect(r.summary.droppedLines).toEqual([7, 3006]);
  });

  it("reads foreign headers through a column map with units", async () => {
    let s = "Time (ms),GyroX,GyroY,GyroZ,Thr,Motor1 Hz\n";
    for (let i = 0; i < 3000; i++) s += `${i * 0.5},${Math.PI / 180},0,0,1500,300\n`;
    const map = parseColumnMap(
      "time=Time (ms)|ms,roll=GyroX|rad/s,pitch=GyroY|rad/s,yaw=GyroZ|rad/s,throttle=Thr|pulse-us,rpm1=Motor1 Hz|hz",
    );
    const r = await collect(s, { map });
    expect(r.info?.sampleRateHz).toBeCloseTo(2000, 6);
    expect(r.roll[0]).toBeCloseTo(1, 12); // 1 degree in rad/s → 1 deg/s
    expect(r.throttle[0]).toBeCloseTo(0.5, 12); // 1500 µs pulse → half throttle
    expect(r.rpm1[0]).toBeCloseTo(18000, 9); // 300 Hz → 18 000 rev/min
  });

  it("tells the throttle scale from the values when the map says auto", async () => {
    let s = "time,gyro x,gyro y,gyro z,throttle %\n";
    for (let i = 0; i < 3000; i++) s += `${i * 1000},0,0,0,${40 + (i % 20)}\n`;
    const r = await collect(s);
    expect(r.throttle[0]).toBeCloseTo(0.4, 12);
    expect(r.info?.guesses.join(" ")).toMatch(/percent/);
  });
});

describe("bad input gets a clear message naming line and column", () => {
  const cases: [string, string | Uint8Array, RegExp][] = [
    ["empty file", "", /the file is empty/],
    ["only metadata", "# airframe: X\n# note: y\n", /no header row was found/],
    [
      "numbers where the header should be",
      "0,1,2,3\n1000,1,2,3\n",
      /line 1: the first line holds numbers/,
    ],
    ["missing gyro column", "time_us,gyro_roll,gyro_pitch\n0,1,2\n", /line 1: no column for yaw/],
    ["header and nothing else", "time_us,gyro_roll,gyro_pitch,gyro_yaw\n", /no sample rows follow/],
    [
      "non-numeric cell",
      canonical(10).replace("\n4000,", "\n4000,abc"),
      /line 10, column 2 \(gyro_roll\): expected a number, found "abc/,
    ],
    [
      "time going backwards",
      canonical(10) + "5000,1,1,1,0.4,20000\n",
      /line 16, column 1 \(time_us\): time goes backwards/,
    ],
    [
      "fewer samples than one segment",
      canonical(300),
      /300 samples at 1000 Hz; one analysis segment needs 512 samples/,
    ],
    [
      "absurd sample rate (10 Hz)",
      canonical(3000, 10),
      /10 Hz, outside 100 Hz – 50 kHz; check its unit/,
    ],
    [
      "absurd sample rate (µs read as s)",
      canonical(3000).replace("time_us", "time_s"),
      /outside 100 Hz – 50 kHz/,
    ],
    [
      "binary garbage",
      new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]),
      /binary data/,
    ],
    [
      "binary inside the rows",
      canonical(10) + "11000,\u0001\u0002,1,1,0.4,2\n",
      /line 16, column 2 \(gyro_roll\): binary data where a number was expected/,
    ],
  ];
  for (const [name, text, message] of cases) {
    it(name, async () => {
      let error: unknown;
      try {
        await analyzeLog(bytesSource(typeof text === "string" ? enc.encode(text) : text));
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(LogFormatError);
      expect((error as Error).message).toMatch(message);
    });
  }

  it("a file over the size limit is stopped while streaming", async () => {
    const e = await failure(canonical(5000), { maxBytes: 10_000 });
    expect(e).toBeInstanceOf(LimitExceededError);
    expect(e.message).toMatch(/larger than the 9.8 KiB limit/);
  });

  it("a file with many incomplete rows is called damaged", async () => {
    const text = canonical(2000).replace(/,20000\n/g, (m, offset: number) =>
      offset % 3 === 0 ? ",\n" : m,
    );
    const e = await failure(text);
    expect(e.message).toMatch(/rows were dropped as damaged .* the file looks damaged/);
  });
});

describe("importer fuzz (seeded): always a result or a clean error, never a crash", () => {
  const valid = demoCsv({ seed: 4, durationS: 1.2, sampleRateHz: 1000 });
  const base = enc.encode(valid);
  it("random bytes", async () => {
    const rand = mulberry32(99);
    for (let n = 0; n < 60; n++) {
      const bytes = new Uint8Array(1 + Math.floor(rand() * 4000)).map(() =>
        Math.floor(rand() * 256),
      );
      await expectCleanOutcome(bytes);
    }
  });
  it("mutated valid files (flipped bytes, cut, duplicated and swapped lines)", async () => {
    const rand = mulberry32(100);
    for (let n = 0; n < 60; n++) {
      const bytes = base.slice();
      const flips = 1 + Math.floor(rand() * 20);
      for (let k = 0; k < flips; k++)
        bytes[Math.floor(rand() * bytes.length)] = Math.floor(rand() * 256);
      const cut = rand() < 0.3 ? bytes.subarray(0, Math.floor(rand() * bytes.length)) : bytes;
      await expectCleanOutcome(cut);
    }
    const lines = valid.split("\n");
    for (let n = 0; n < 20; n++) {
      const copy = [...lines];
      const i = 6 + Math.floor(rand() * (copy.length - 7));
      const j = 6 + Math.floor(rand() * (copy.length - 7));
      [copy[i], copy[j]] = [copy[j] ?? "", copy[i] ?? ""];
      copy.splice(i, 0, copy[i] ?? "");
      await expectCleanOutcome(enc.encode(copy.join("\n")));
    }
  });
});

async function expectCleanOutcome(bytes: Uint8Array): Promise<void> {
  try {
    const { analysis } = await analyzeLog(bytesSource(bytes, 1 + (bytes.length % 977)));
    expect(analysis.samples).toBeGreaterThan(0);
  } catch (e) {
    expect(e).toBeInstanceOf(DomainError);
    expect((e as Error).message.length).toBeGreaterThan(10);
    expect((e as Error).message).not.toMatch(/\bat .*\.ts:\d+/);
  }
}

describe("sample rate from a line fit of the time stamps", () => {
  const rowsAt = (stamps: string[]) =>
    "time_us,gyro_roll,gyro_pitch,gyro_yaw\n" + stamps.map((t) => `${t},1,2,3\n`).join("");
  it("exactly 50 kHz (20 µs steps) is accepted and read as 50000 Hz", async () => {
    const r = await collect(rowsAt(Array.from({ length: 5000 }, (_, k) => String(k * 20))));
    expect(r.info?.sampleRateHz).toBe(50_000);
  });
  it("Unix-epoch µs stamps give the exact rate (the first stamp is subtracted before scaling)", async () => {
    // 1.76e15 µs is 2026 in Unix time; scaled to seconds first, such a stamp keeps only ~0.24 µs.
    const r = await collect(
      rowsAt(Array.from({ length: 5000 }, (_, k) => String(1_764_338_700_000_000 + k * 250))),
    );
    expect(r.info?.sampleRateHz).toBe(4000);
    expect(r.time[4999]).toBeCloseTo(4999 * 250e-6, 12);
  });
});

describe("one line and header rule, whatever the chunk sizes", () => {
  const rows = Array.from({ length: 3000 }, (_, k) => `${k * 500},1,2,3\n`).join("");
  const withHeader = (header: string) => enc.encode(header + "\n" + rows);
  it("a 100 KB header line is read with 1 MiB, 32 KiB and 1000-byte reads alike", async () => {
    const header = "time_us,gyro_roll,gyro_pitch,gyro_yaw" + ",x".repeat(50_000);
    // Rows carry the same 50,004 cells as the header (empty ones), else they would be damaged.
    const text = enc.encode(
      header +
        "\n" +
        Array.from({ length: 200 }, (_, k) => `${k * 500},1,2,3${",".repeat(50_000)}\n`).join(""),
    );
    for (const chunk of [1 << 20, 32 * 1024, 1000]) {
      const r = await collect(text, {}, chunk);
      expect(r.summary.samples).toBe(200);
    }
  });
  it("a line of MAX_LINE_BYTES is read, one byte more is refused, at any chunk size", async () => {
    for (const chunk of [1 << 21, 1 << 20, 4096, 777]) {
      const ok = await collect(
        enc.encode(
          `#${"n".repeat(MAX_LINE_BYTES - 1)}\n` + "time_us,gyro_roll,gyro_pitch,gyro_yaw\n" + rows,
        ),
        {},
        chunk,
      );
      expect(ok.summary.samples).toBe(3000);
      const e = await failure(
        enc.encode(
          `#${"n".repeat(MAX_LINE_BYTES)}\r\n` + "time_us,gyro_roll,gyro_pitch,gyro_yaw\n" + rows,
        ),
      );
      expect(e.message).toBe(
        "line 1: the line is longer than 1 MiB: this does not look like a CSV log",
      );
    }
  });
  it("CR-only line endings are read; CRLF stays CRLF", async () => {
    expect(
      (
        await collect(
          withHeader("time_us,gyro_roll,gyro_pitch,gyro_yaw").map((b) => (b === 10 ? 13 : b)),
          {},
          100,
        )
      ).summary.samples,
    ).toBe(3000);
    const crlf = new TextDecoder()
      .decode(withHeader("time_us,gyro_roll,gyro_pitch,gyro_yaw"))
      .replace(/\n/g, "\r\n");
    expect((await collect(crlf, {}, 333)).summary.samples).toBe(3000);
  });
});

describe("what a file that is not CSV text is", () => {
  const log = canonical(100);
  it("gzip (magic 1f 8b, RFC 1952 §2.3.1), zip (PK 03 04, PKWARE APPNOTE 4.3.7) and UTF-16 (byte-order mark, Unicode §23.8) are named", async () => {
    const { gzipSync } = await import("node:zlib");
    expect((await failure(new Uint8Array(gzipSync(log)))).message).toMatch(
      /^the file is gzip-compressed/,
    );
    expect((await failure(enc.encode("PK\u0003\u0004" + log))).message).toMatch(
      /^the file is a zip archive/,
    );
    const le = new Uint8Array(2 + log.length * 2);
    le.set([0xff, 0xfe]);
    for (let i = 0; i < log.length; i++) le[2 + 2 * i] = log.charCodeAt(i);
    expect((await failure(le)).message).toMatch(/^the file is UTF-16 text/);
    expect((await failure(le.subarray(2))).message).toMatch(/^the file is UTF-16 text/); // no mark
  });
});

describe("rows whose cell count differs from the header's", () => {
  it("are dropped as damaged; consistent extra cells name decimal commas and the line", async () => {
    const commas = canonical(3000).replace(
      /\n(\d+),(-?\d+),/g,
      (_m, t: string, r: string) => `\n${t},${r},5,`,
    );
    const e = await failure(commas);
    expect(e).toBeInstanceOf(LogFormatError);
    expect(e.message).toMatch(
      /^line 6: this row has 7 cells but the header names 6 columns, and so do 3000 of 3000 rows: the numbers probably use decimal commas \(12,5\) or thousands separators \(21,050\)/,
    );
    const few = canonical(3000).replace("\n1000,", "\n1000,9,");
    expect((await collect(few)).summary).toMatchObject({ droppedRows: 1, droppedLines: [7] });
  });
  it("a map handed to the reader as an object that binds one column to two keys says which column", async () => {
    const map: ColumnMap = [
      { header: "time_us", channel: { kind: "time", unit: "us" } },
      { header: "gyro_roll", channel: { kind: "gyro", axis: "roll", unit: "deg/s" } },
      { header: "gyro_roll", channel: { kind: "gyro", axis: "pitch", unit: "deg/s" } },
      { header: "gyro_yaw", channel: { kind: "gyro", axis: "yaw", unit: "deg/s" } },
    ];
    expect((await failure(canonical(3000), { map })).message).toMatch(
      /the map binds the column "gyro_roll" twice/,
    );
  });
});

describe("LogReader pushed by hand (an upload checked while it streams)", () => {
  const noRows = { begin: () => undefined, block: () => undefined, gap: () => undefined };
  it("knows the header as soon as its line has arrived, and the summary at the end", () => {
    const bytes = enc.encode(canonical(3000));
    const reader = new LogReader(noRows);
    reader.push(bytes.subarray(0, 1000));
    expect(reader.headerFound).toMatchObject({ line: 5, metadata: { airframe: "Test-01" } });
    reader.push(bytes.subarray(1000));
    expect(reader.finish()).toMatchObject({
      samples: 3000,
      droppedRows: 0,
      gapCount: 0,
      bytes: bytes.length,
    });
  });
  it("throws the line and column of the first bad cell from the push that brings it", () => {
    const bytes = enc.encode(canonical(3000).replace("\n2000,", "\n2000,zz"));
    const reader = new LogReader(noRows);
    let error: unknown;
    try {
      for (let at = 0; at < bytes.length; at += 4096) reader.push(bytes.subarray(at, at + 4096));
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(LogFormatError);
    expect((error as LogFormatError).location).toMatchObject({
      line: 8,
      column: 2,
      columnName: "gyro_roll",
    });
  });
});
