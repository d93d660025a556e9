/**
 * The malformed-log corpus of the reliability suite: a few hundred generated files, each with the
 * outcome the reading rules in the README promise for it — accepted (with its sample count, rate,
 * gaps or dropped rows where they are the point), or rejected with the error code, a fragment of the
 * sentence, and the line and column it must name. The same cases run through the reader, the CLI
 * (test/reliability/reader-corpus.test.ts) and the upload API (the server half of the suite).
 *
 * Every byte is generated here from a seed; the signals are invented test data. Line numbers are
 * 1-based as an editor shows them; columns are 1-based cells.
 *
 *     npx tsx test/reliability/corpus.ts --table        # the table of cases (corpus-table.md)
 *     npx tsx test/reliability/corpus.ts --write <dir>  # the files and index.json
 */
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { deflateRawSync, gzipSync } from "node:zlib";
import { mulberry32, type Random } from "../../lib/demo/random";

export type ErrorCodeExpected = "bad-log" | "bad-input" | "limit-exceeded";

export type Expected =
  | {
      outcome: "accepted";
      /** Rows read as samples. */
      samples?: number;
      sampleRateHz?: number;
      /** Relative tolerance on sampleRateHz (default 0: exact). */
      rateTolerance?: number;
      gaps?: number;
      droppedRows?: number;
    }
  | {
      outcome: "rejected";
      /**
       * Who refuses it: `map` the column-map text (before any byte is read), `read` the log reader,
       * `analysis` the analyser after a successful read (too few samples for one segment).
       */
      stage: "map" | "read" | "analysis";
      code: ErrorCodeExpected;
      /** A fragment of the message, exactly as it appears in it. */
      sentence: string;
      line?: number;
      column?: number;
    };

export interface CorpusCase {
  /** Unique, usable as a file name (".csv" is added). */
  id: string;
  family: string;
  /** What is odd about the file, in words. */
  what: string;
  bytes: Uint8Array;
  /** Column map text (the CLI's --map, the API's mapText) the case is read with. */
  map?: string;
  /** Size limit in MiB (the CLI's --max-mb). */
  maxMb?: number;
  expect: Expected;
}

const enc = new TextEncoder();
const CANONICAL = [
  "time_us",
  "gyro_roll",
  "gyro_pitch",
  "gyro_yaw",
  "throttle",
  "rpm_1",
  "rpm_2",
  "rpm_3",
  "rpm_4",
];
const META = [
  "# airframe: Corpus-01",
  "# flown_at: 2026-11-28T14:05:00Z",
  "# note: reliability corpus",
];

interface LogSpec {
  rows?: number;
  rateHz?: number;
  header?: string[];
  meta?: string[];
  eol?: string;
  /** Time stamp of row k, in the time column's unit (default µs from rateHz). */
  time?: (k: number) => string;
  /** Replaces the cells of row k (all of them) when it returns an array. */
  row?: (k: number, cells: string[]) => string[] | string | null;
  seed?: number;
  finalEol?: boolean;
}

/** Rows of invented gyro data: a 150 Hz tone with noise on each axis, hover throttle, four motors. */
function cellsOf(k: number, rateHz: number, rand: Random, width: number): string[] {
  const t = k / rateHz;
  const roll = 20 * Math.sin(2 * Math.PI * 150 * t) + (rand() - 0.5) * 6;
  const pitch = 15 * Math.sin(2 * Math.PI * 210 * t + 1) + (rand() - 0.5) * 6;
  const yaw = 5 * Math.sin(2 * Math.PI * 95 * t + 2) + (rand() - 0.5) * 3;
  const cells = [
    roll.toFixed(3),
    pitch.toFixed(3),
    yaw.toFixed(3),
    (0.42 + 0.1 * Math.sin(t)).toFixed(4),
    "21050",
    "20980",
    "21210",
    "21003",
  ];
  return cells.slice(0, Math.max(0, width - 1));
}

/** Text of a log: metadata lines, the header line, then rows; returns the text and the header's line. */
function logText(spec: LogSpec = {}): { text: string; headerLine: number; firstRowLine: number } {
  const rows = spec.rows ?? 2500;
  const rate = spec.rateHz ?? 2000;
  const header = spec.header ?? CANONICAL;
  const meta = spec.meta ?? META;
  const eol = spec.eol ?? "\n";
  const rand = mulberry32(spec.seed ?? 7);
  const lines = [...meta, header.join(",")];
  for (let k = 0; k < rows; k++) {
    const time = spec.time ? spec.time(k) : String(Math.round((k * 1e6) / rate));
    const cells = [time, ...cellsOf(k, rate, rand, header.length)];
    const replaced = spec.row ? spec.row(k, cells) : null;
    if (replaced === null) lines.push(cells.join(","));
    else if (typeof replaced === "string") lines.push(replaced);
    else lines.push(replaced.join(","));
  }
  const text = lines.join(eol) + (spec.finalEol === false ? "" : eol);
  return { text, headerLine: meta.length + 1, firstRowLine: meta.length + 2 };
}

const bytesOf = (s: string) => enc.encode(s);

function concatBytes(...parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

function utf16(text: string, bigEndian: boolean, bom: boolean): Uint8Array {
  const out = new Uint8Array((bom ? 2 : 0) + text.length * 2);
  let at = 0;
  if (bom) {
    out[0] = bigEndian ? 0xfe : 0xff;
    out[1] = bigEndian ? 0xff : 0xfe;
    at = 2;
  }
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[at + 2 * i] = bigEndian ? c >> 8 : c & 0xff;
    out[at + 2 * i + 1] = bigEndian ? c & 0xff : c >> 8;
  }
  return out;
}

const MIB = 1024 * 1024;

let built: CorpusCase[] | null = null;

/** Every case of the corpus, in a fixed order (built once per process; treat the bytes as read-only). */
export function buildCorpus(): CorpusCase[] {
  built ??= generate();
  return built;
}

function generate(): CorpusCase[] {
  const cases: CorpusCase[] = [];
  const add = (c: CorpusCase) => cases.push(c);
  const base = logText();
  const accepted = (
    id: string,
    what: string,
    bytes: Uint8Array,
    expect: Partial<Extract<Expected, { outcome: "accepted" }>> = {},
    extra: Partial<CorpusCase> = {},
  ) =>
    add({
      id,
      family: "accepted",
      what,
      bytes,
      expect: { outcome: "accepted", ...expect },
      ...extra,
    });
  const rejected = (
    family: string,
    id: string,
    what: string,
    bytes: Uint8Array,
    expect: Omit<Extract<Expected, { outcome: "rejected" }>, "outcome" | "stage" | "code"> & {
      stage?: "map" | "read" | "analysis";
      code?: ErrorCodeExpected;
    },
    extra: Partial<CorpusCase> = {},
  ) =>
    add({
      id,
      family,
      what,
      bytes,
      expect: {
        outcome: "rejected",
        stage: expect.stage ?? "read",
        code: expect.code ?? "bad-log",
        ...expect,
      },
      ...extra,
    });

  // ---- accepted: odd but valid ---------------------------------------------------------------
  accepted("plain", "a canonical log", bytesOf(base.text), {
    samples: 2500,
    sampleRateHz: 2000,
    gaps: 0,
    droppedRows: 0,
  });
  accepted("crlf", "CRLF line endings", bytesOf(logText({ eol: "\r\n" }).text), {
    samples: 2500,
    sampleRateHz: 2000,
  });
  accepted(
    "cr-only",
    "CR-only line endings (old Macintosh text)",
    bytesOf(logText({ eol: "\r" }).text),
    { samples: 2500, sampleRateHz: 2000 },
  );
  accepted(
    "cr-only-no-final",
    "CR-only line endings, no line ending after the last row",
    bytesOf(logText({ eol: "\r", finalEol: false }).text),
    { samples: 2500 },
  );
  accepted("bom", "a UTF-8 byte-order mark before the first line", bytesOf("\uFEFF" + base.text), {
    samples: 2500,
  });
  accepted(
    "no-final-eol",
    "no line ending after the last row",
    bytesOf(logText({ finalEol: false }).text),
    { samples: 2500, droppedRows: 0 },
  );
  accepted("no-metadata", "no # lines at all", bytesOf(logText({ meta: [] }).text), {
    samples: 2500,
  });
  accepted(
    "blank-lines",
    "blank lines between metadata, header and rows",
    bytesOf(base.text.replace("# note", "\n\n# note").replace("\n0,", "\n\n0,")),
    { samples: 2500 },
  );
  accepted("trailing-blank", "blank lines after the last row", bytesOf(base.text + "\n\n\n"), {
    samples: 2500,
  });
  accepted(
    "metadata-10000",
    "10,000 metadata lines before the header",
    bytesOf(
      logText({
        meta: [...META, ...Array.from({ length: 10_000 }, (_, i) => `# extra_${i}: value ${i}`)],
      }).text,
    ),
    { samples: 2500 },
  );
  accepted(
    "note-70k",
    "a 70 KB note line",
    bytesOf(logText({ meta: [...META, `# long_note: ${"pit notes ".repeat(7000)}`] }).text),
    { samples: 2500 },
  );
  accepted(
    "comment-900k",
    "a 900 KiB comment line (under the 1 MiB line limit)",
    bytesOf(logText({ meta: [...META, `# ${"x".repeat(900 * 1024)}`] }).text),
    { samples: 2500 },
  );
  accepted(
    "line-at-limit",
    "a comment line of exactly 1 MiB",
    bytesOf(logText({ meta: [...META, `#${"y".repeat(MIB - 1)}`] }).text),
    { samples: 2500 },
  );
  accepted(
    "line-at-limit-crlf",
    "a comment line of exactly 1 MiB ending in CRLF",
    bytesOf(logText({ meta: [...META, `#${"y".repeat(MIB - 1)}`], eol: "\r\n" }).text),
    { samples: 2500 },
  );
  accepted(
    "wide-header",
    "a 100 KB header line (many unused columns)",
    bytesOf(
      logText({
        header: [...CANONICAL, ...Array.from({ length: 8000 }, (_, i) => `aux${i}`)],
        row: (k, c) => [...c, ...Array.from({ length: 8000 }, () => "")],
        rows: 1200,
      }).text,
    ),
    { samples: 1200 },
  );
  accepted(
    "time-s",
    "time in seconds (time_s)",
    bytesOf(
      logText({ header: ["time_s", ...CANONICAL.slice(1)], time: (k) => (k / 2000).toFixed(6) })
        .text,
    ),
    { samples: 2500, sampleRateHz: 2000 },
  );
  accepted(
    "epoch-us",
    "Unix-epoch µs time stamps",
    bytesOf(
      logText({ time: (k) => String(1_764_338_700_000_000 + k * 250), rateHz: 4000, rows: 5000 })
        .text,
    ),
    { samples: 5000, sampleRateHz: 4000 },
  );
  accepted(
    "epoch-s",
    "Unix-epoch time in seconds with µs decimals",
    bytesOf(
      logText({
        header: ["time_s", ...CANONICAL.slice(1)],
        time: (k) => (1_764_338_700 + k * 0.0005).toFixed(6),
      }).text,
    ),
    { samples: 2500, sampleRateHz: 2000, rateTolerance: 1e-6 },
  );
  {
    const rand = mulberry32(21);
    // 8 kHz on integer-µs stamps: the true step is 125 µs, each stamp jittered by up to ±40 µs.
    // Tolerance: a least-squares slope over n = 4096 stamps with jitter of standard deviation σ
    // (80/√12 µs here) has a standard error of σ·√(12/n³) (ordinary least squares), 2.4e-6 of the
    // 125 µs step; 2e-5 is about 8 of them. The median step was 0.4 % off on such stamps.
    accepted(
      "jitter-heavy",
      "integer-µs stamps of an 8 kHz log with ±40 µs jitter on every stamp",
      bytesOf(
        logText({
          rateHz: 8000,
          rows: 20000,
          time: (k) => String(Math.round(k * 125 + (rand() - 0.5) * 80)),
        }).text,
      ),
      { samples: 20000, sampleRateHz: 8000, rateTolerance: 2e-5 },
    );
  }
  {
    const rand = mulberry32(22);
    // 3.2 kHz has a 312.5 µs step that integer stamps cannot hold: they alternate 312 and 313.
    accepted(
      "jitter-integer",
      "integer-µs stamps of a 3.2 kHz log (312.5 µs step) with ±20 µs jitter",
      bytesOf(
        logText({
          rateHz: 3200,
          rows: 8000,
          time: (k) => String(Math.round(k * 312.5 + (rand() - 0.5) * 40)),
        }).text,
      ),
      { samples: 8000, sampleRateHz: 3200, rateTolerance: 1e-5 },
    );
  }
  accepted(
    "rate-50k",
    "exactly 50 kHz (20 µs steps), the highest rate accepted",
    bytesOf(logText({ rateHz: 50_000, rows: 40_000 }).text),
    { samples: 40_000, sampleRateHz: 50_000 },
  );
  accepted(
    "rate-100",
    "exactly 100 Hz, the lowest rate accepted",
    bytesOf(logText({ rateHz: 100, rows: 600 }).text),
    { samples: 600, sampleRateHz: 100 },
  );
  accepted("rate-1k", "1 kHz", bytesOf(logText({ rateHz: 1000, rows: 2000 }).text), {
    samples: 2000,
    sampleRateHz: 1000,
  });
  accepted("rate-8k", "8 kHz", bytesOf(logText({ rateHz: 8000, rows: 9000 }).text), {
    samples: 9000,
    sampleRateHz: 8000,
  });
  accepted(
    "one-gap",
    "a 20 ms hole in the stamps",
    bytesOf(logText({ time: (k) => String(k * 500 + (k >= 1500 ? 20_000 : 0)) }).text),
    { samples: 2500, gaps: 1 },
  );
  accepted(
    "three-gaps",
    "three holes",
    bytesOf(
      logText({ rows: 6000, time: (k) => String(k * 500 + Math.floor(k / 1500) * 10_000) }).text,
    ),
    { samples: 6000, gaps: 3 },
  );
  accepted(
    "many-gaps",
    "4,096 rows at one rate, then every step a gap (a slower rate)",
    bytesOf(
      logText({
        rows: 8000,
        time: (k) => String(k < 4096 ? k * 500 : 4096 * 500 + (k - 4096) * 2000),
      }).text,
    ),
    // Row 4097 (k = 4096) still follows at the first rate; each later step is a gap.
    { samples: 8000, gaps: 8000 - 4097, sampleRateHz: 2000 },
  );
  accepted(
    "few-empty-cells",
    "3 % of rows with an empty cell (dropped, under the 5 % rule)",
    bytesOf(
      logText({ row: (k, c) => (k % 33 === 5 ? [c[0] ?? "", "", ...c.slice(2)] : null) }).text,
    ),
    { droppedRows: 76, samples: 2424 },
  );
  accepted(
    "few-wide-rows",
    "2 % of rows with one cell too many (dropped)",
    bytesOf(logText({ row: (k, c) => (k % 50 === 3 ? [...c, "9"] : null) }).text),
    { droppedRows: 50, samples: 2450 },
  );
  accepted(
    "trailing-commas",
    "every row ends with a comma the header does not have (empty extra cells)",
    bytesOf(logText({ row: (_k, c) => [...c, ""] }).text),
    { samples: 2500, droppedRows: 0 },
  );
  accepted(
    "trailing-commas-crlf",
    "rows ending with an empty extra cell and CRLF",
    bytesOf(logText({ row: (_k, c) => [...c, "", ""], eol: "\r\n" }).text),
    { samples: 2500, droppedRows: 0 },
  );
  accepted(
    "few-short-rows",
    "2 % of rows with a cell missing (dropped)",
    bytesOf(logText({ row: (k, c) => (k % 50 === 3 ? c.slice(0, -1) : null) }).text),
    { droppedRows: 50, samples: 2450 },
  );
  accepted(
    "repeated-stamps",
    "1 % of rows repeat the previous time stamp (dropped)",
    bytesOf(logText({ time: (k) => String((k % 100 === 50 ? k - 1 : k) * 500) }).text),
    { droppedRows: 25, samples: 2475 },
  );
  accepted(
    "truncated-last",
    "the last row cut off mid-cell",
    bytesOf(base.text + "1250000,1.5,2"),
    { droppedRows: 1, samples: 2500 },
  );
  accepted(
    "quoted-cells",
    "every cell in double quotes",
    bytesOf(logText({ row: (_k, c) => c.map((x) => `"${x}"`) }).text),
    { samples: 2500 },
  );
  accepted(
    "quoted-header",
    "header names in double quotes",
    bytesOf(logText({ header: CANONICAL.map((h) => `"${h}"`) }).text),
    { samples: 2500 },
  );
  accepted(
    "spaces",
    "spaces around cells",
    bytesOf(logText({ row: (_k, c) => c.map((x) => ` ${x} `) }).text),
    { samples: 2500 },
  );
  accepted(
    "exponents",
    "gyro cells in exponent notation",
    bytesOf(
      logText({
        row: (_k, c) => [
          c[0] ?? "",
          ...c.slice(1, 4).map((x) => Number(x).toExponential(6)),
          ...c.slice(4),
        ],
      }).text,
    ),
    { samples: 2500 },
  );
  accepted(
    "plus-signs",
    "explicit + signs",
    bytesOf(
      logText({ row: (_k, c) => c.map((x, i) => (i > 0 && !x.startsWith("-") ? `+${x}` : x)) })
        .text,
    ),
    { samples: 2500 },
  );
  accepted(
    "extra-columns",
    "unused columns between the known ones",
    bytesOf(
      logText({
        header: ["time_us", "cycle", "gyro_roll", "gyro_pitch", "note", "gyro_yaw"],
        row: (k, c) => [c[0] ?? "", String(k), c[1] ?? "", c[2] ?? "", "ok", c[3] ?? ""],
      }).text,
    ),
    { samples: 2500 },
  );
  accepted(
    "columns-reordered",
    "the known columns in another order",
    bytesOf(
      logText({
        header: ["gyro_yaw", "gyro_pitch", "time_us", "gyro_roll"],
        row: (_k, c) => [c[3] ?? "", c[2] ?? "", c[0] ?? "", c[1] ?? ""],
      }).text,
    ),
    { samples: 2500 },
  );
  accepted(
    "setpoints",
    "setpoint columns",
    bytesOf(
      logText({
        header: [...CANONICAL, "setpoint_roll", "setpoint_pitch", "setpoint_yaw"],
        row: (_k, c) => [...c, "10", "-5", "0"],
      }).text,
    ),
    { samples: 2500 },
  );
  accepted(
    "foreign-map",
    "foreign headers read through a column map with units (ms, rad/s, pulse-µs, Hz)",
    bytesOf(
      logText({
        header: ["Clock ms", "RateA", "RateB", "RateC", "Stick", "Spin1"],
        time: (k) => (k * 0.5).toFixed(1),
        row: (_k, c) => [
          c[0] ?? "",
          ...c.slice(1, 4).map((x) => (Number(x) / 57.29577951308232).toFixed(6)),
          "1420",
          "350",
        ],
      }).text,
    ),
    { samples: 2500, sampleRateHz: 2000 },
    {
      map: "time=Clock ms|ms,roll=RateA|rad/s,pitch=RateB|rad/s,yaw=RateC|rad/s,throttle=Stick|pulse-us,rpm1=Spin1|hz",
    },
  );
  accepted(
    "foreign-guessed",
    "invented foreign headers read by the proposed map: indexed axes, 0-based motors, a loop counter",
    bytesOf(
      logText({
        header: [
          "cycle",
          "elapsed time [us]",
          "gyr_filt[0]",
          "gyr_filt[1]",
          "gyr_filt[2]",
          "stick_cmd[3]",
          "throttle %",
          "motor 0 rpm",
          "motor 1 rpm",
        ],
        row: (k, c) => [
          String(k),
          c[0] ?? "",
          c[1] ?? "",
          c[2] ?? "",
          c[3] ?? "",
          "1500",
          "42",
          "21000",
          "21010",
        ],
      }).text,
    ),
    { samples: 2500, sampleRateHz: 2000 },
  );
  for (const [i, rate] of [250, 500, 1600, 3333, 6400, 16000].entries()) {
    const rows = Math.max(1500, Math.ceil(rate * 1.2));
    accepted(
      `rate-${rate}`,
      `${rate} Hz on rounded integer-µs stamps`,
      bytesOf(logText({ rateHz: rate, rows, seed: 30 + i }).text),
      { samples: rows, sampleRateHz: rate, rateTolerance: 1e-6 },
    );
  }

  // ---- not a CSV text file at all -------------------------------------------------------------
  const notText = (id: string, what: string, bytes: Uint8Array, sentence: string, line?: number) =>
    rejected("not-text", id, what, bytes, { sentence, ...(line === undefined ? {} : { line }) });
  notText(
    "gzip",
    "a gzip-compressed log",
    new Uint8Array(gzipSync(Buffer.from(base.text))),
    "the file is gzip-compressed",
  );
  notText(
    "gzip-small",
    "a gzip-compressed tiny log",
    new Uint8Array(gzipSync(Buffer.from("time_us,gyro_roll\n"))),
    "the file is gzip-compressed",
  );
  {
    // A minimal zip archive holding the log, stored with deflate (PKWARE APPNOTE local file header).
    const data = new Uint8Array(deflateRawSync(Buffer.from(base.text)));
    const name = bytesOf("log.csv");
    const header = new Uint8Array(30);
    const dv = new DataView(header.buffer);
    dv.setUint32(0, 0x04034b50, true);
    dv.setUint16(4, 20, true);
    dv.setUint16(8, 8, true);
    dv.setUint32(18, data.length, true);
    dv.setUint32(22, base.text.length, true);
    dv.setUint16(26, name.length, true);
    notText(
      "zip",
      "a zip archive holding the log",
      concatBytes(header, name, data),
      "the file is a zip archive",
    );
  }
  notText(
    "utf16le-bom",
    "UTF-16 little-endian with a byte-order mark",
    utf16(base.text, false, true),
    "the file is UTF-16 text",
  );
  notText(
    "utf16be-bom",
    "UTF-16 big-endian with a byte-order mark",
    utf16(base.text, true, true),
    "the file is UTF-16 text",
  );
  notText(
    "utf16le",
    "UTF-16 little-endian without a mark",
    utf16(base.text, false, false),
    "the file is UTF-16 text",
  );
  notText(
    "utf16be",
    "UTF-16 big-endian without a mark",
    utf16(base.text, true, false),
    "the file is UTF-16 text",
  );
  notText(
    "utf32le",
    "UTF-32 little-endian with a byte-order mark",
    concatBytes(new Uint8Array([0xff, 0xfe, 0, 0]), new Uint8Array(16)),
    "the file is UTF-32 text",
  );
  notText(
    "image",
    "an image file's first bytes",
    new Uint8Array([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52,
    ]),
    "binary data or an unknown text encoding",
    1,
  );
  notText(
    "nul-header",
    "a NUL byte inside the header line",
    bytesOf(base.text.replace("gyro_pitch", "gyro\u0000pitch")),
    "the file holds binary data, not CSV text",
    4,
  );
  notText(
    "control-chars",
    "control characters in a metadata line",
    bytesOf(base.text.replace("reliability", "reli\u0007ability")),
    "the file holds binary data, not CSV text",
    3,
  );
  notText(
    "latin1-header",
    "a Latin-1 (not UTF-8) byte in the metadata",
    concatBytes(bytesOf("# note: caf"), new Uint8Array([0xe9]), bytesOf("\n" + base.text)),
    "unknown text encoding, not UTF-8 CSV",
    1,
  );
  for (let s = 0; s < 12; s++) {
    const rand = mulberry32(500 + s);
    // Random bytes with NULs: no text file looks like this. Lengths up to 20 KB.
    // Two letters, then a NUL before any line ending: never a magic number, always binary on line 1.
    const bytes = new Uint8Array(64 + Math.floor(rand() * 20_000)).map(() =>
      Math.floor(rand() * 256),
    );
    bytes[0] = 0x41 + Math.floor(rand() * 20);
    bytes[1] = 0x41;
    bytes[2] = 0;
    add({
      id: `random-bytes-${s}`,
      family: "not-text",
      what: `${bytes.length} random bytes`,
      bytes,
      expect: {
        outcome: "rejected",
        stage: "read",
        code: "bad-log",
        sentence: "the file holds binary data, not CSV text",
        line: 1,
      },
    });
  }

  // ---- no usable header -----------------------------------------------------------------------
  rejected("no-header", "empty", "an empty file", new Uint8Array(0), {
    sentence: "the file is empty",
  });
  rejected("no-header", "whitespace", "only blank lines and spaces", bytesOf("\n  \n\t\n\n"), {
    sentence: "no header row was found",
  });
  for (const n of [1, 3, 50]) {
    rejected(
      "no-header",
      `only-metadata-${n}`,
      `${n} metadata lines and nothing else`,
      bytesOf(Array.from({ length: n }, (_, i) => `# key${i}: v`).join("\n") + "\n"),
      { sentence: "no header row was found" },
    );
  }
  rejected(
    "no-header",
    "numbers-first",
    "rows without a header line",
    bytesOf(base.text.split("\n").slice(4).join("\n")),
    { sentence: "the first line holds numbers, not column names", line: 1 },
  );
  rejected(
    "no-header",
    "numbers-after-meta",
    "metadata, then rows without a header",
    bytesOf(
      base.text
        .split("\n")
        .filter((_l, i) => i !== 3)
        .join("\n"),
    ),
    { sentence: "the first line holds numbers, not column names", line: 4 },
  );
  {
    const meta = Array.from({ length: 4500 }, (_, i) => `# k${i}: ${"m".repeat(1000)}`);
    // The first line that starts at or after byte 4 MiB is refused.
    let offset = 0;
    let line = 1;
    while (offset < 4 * MIB) offset += (meta[line++ - 1] ?? "").length + 1;
    rejected(
      "no-header",
      "preamble-over-4mib",
      "metadata lines filling more than 4 MiB before the header",
      bytesOf(logText({ meta, rows: 10 }).text),
      { sentence: "no header row in the first 4 MiB", line },
    );
  }
  const missing: [string, string[], string][] = [
    ["no-time", ["gyro_roll", "gyro_pitch", "gyro_yaw"], "no column for time"],
    ["no-roll", ["time_us", "gyro_pitch", "gyro_yaw"], "no column for roll"],
    ["no-pitch", ["time_us", "gyro_roll", "gyro_yaw"], "no column for pitch"],
    ["no-yaw", ["time_us", "gyro_roll", "gyro_pitch"], "no column for yaw"],
    ["no-gyro", ["time_us", "throttle"], "no column for roll, pitch, yaw"],
    ["only-time", ["time_us"], "no column for roll, pitch, yaw"],
    ["misspelled", ["tiem_us", "gyro_roll", "gyro_pitch", "gyro_yaw"], "no column for time"],
    ["unrelated", ["alpha", "beta", "gamma", "delta"], "no column for time, roll, pitch, yaw"],
  ];
  for (const [id, header, sentence] of missing) {
    rejected(
      "missing-column",
      id,
      `header ${header.join(",")}`,
      bytesOf(logText({ header, rows: 50 }).text),
      { sentence, line: 4 },
    );
  }
  rejected(
    "missing-column",
    "semicolons",
    "a semicolon-separated file",
    bytesOf(logText({ rows: 50 }).text.replace(/,/g, ";")),
    { sentence: "the columns seem separated by semicolons", line: 4 },
  );
  rejected(
    "missing-column",
    "tabs",
    "a tab-separated file",
    bytesOf(logText({ rows: 50 }).text.replace(/,/g, "\t")),
    { sentence: "the columns seem separated by tabs", line: 4 },
  );
  rejected(
    "missing-column",
    "strict-no-guess",
    "foreign headers with a map that misses a header",
    bytesOf(logText({ header: ["T", "A", "B", "C"], rows: 50 }).text),
    { sentence: 'the map names a column "Z" for yaw, but the header has no such column', line: 4 },
    { map: "time=T,roll=A,pitch=B,yaw=Z" },
  );

  // ---- over-long lines ------------------------------------------------------------------------
  rejected(
    "long-line",
    "comment-over-limit",
    "a comment line of 1 MiB + 1 byte",
    bytesOf(logText({ meta: [...META, `#${"y".repeat(MIB)}`] }).text),
    { sentence: "the line is longer than 1 MiB", line: 4 },
  );
  rejected(
    "long-line",
    "comment-over-limit-crlf",
    "a comment line of 1 MiB + 1 byte ending in CRLF",
    bytesOf(logText({ meta: [...META, `#${"y".repeat(MIB)}`], eol: "\r\n" }).text),
    { sentence: "the line is longer than 1 MiB", line: 4 },
  );
  rejected(
    "long-line",
    "no-newlines",
    "1.5 MB without a line ending",
    bytesOf("a,".repeat(750_000)),
    { sentence: "the line is longer than 1 MiB", line: 1 },
  );
  rejected(
    "long-line",
    "header-2mib",
    "a 2 MiB header line",
    bytesOf(
      logText({
        header: [...CANONICAL, ...Array.from({ length: 200_000 }, (_, i) => `c${i}`)],
        rows: 5,
      }).text,
    ),
    { sentence: "the line is longer than 1 MiB", line: 4 },
  );
  for (const at of [0, 100, 2000]) {
    rejected(
      "long-line",
      `row-over-limit-${at}`,
      `row ${at + 1} is 1.1 MiB long`,
      bytesOf(logText({ row: (k, c) => (k === at ? [...c, "9".repeat(1_150_000)] : null) }).text),
      { sentence: "the line is longer than 1 MiB", line: 5 + at },
    );
  }

  // ---- cells that are not numbers -------------------------------------------------------------
  const garbage = [
    "abc",
    "1.2.3",
    "--1",
    "NaN",
    "inf",
    "0x10",
    "1e",
    "12..5",
    "one",
    "?",
    "1 2",
    "5-",
    "1e999",
    "#",
    "true",
  ];
  {
    const rand = mulberry32(77);
    for (let i = 0; i < 45; i++) {
      const k = Math.floor(rand() * 2400);
      const col = 1 + Math.floor(rand() * 8); // 0-based cell index 1..8 (not time)
      const g = garbage[i % garbage.length] ?? "abc";
      const text = logText({
        row: (r, c) => (r === k ? c.map((x, j) => (j === col ? g : x)) : null),
      }).text;
      rejected(
        "bad-cell",
        `bad-cell-${String(i).padStart(2, "0")}`,
        `"${g}" in row ${k + 1}, column ${col + 1}`,
        bytesOf(text),
        {
          sentence: `expected a number, found "${g}`,
          line: 5 + k,
          column: col + 1,
        },
      );
    }
    for (let i = 0; i < 10; i++) {
      const k = Math.floor(rand() * 2400);
      const text = logText({
        row: (r, c) => (r === k ? c.map((x, j) => (j === 0 ? `t${x}` : x)) : null),
      }).text;
      rejected(
        "bad-cell",
        `bad-time-${i}`,
        `a letter in the time stamp of row ${k + 1}`,
        bytesOf(text),
        { sentence: "expected a number, found", line: 5 + k, column: 1 },
      );
    }
    for (let i = 0; i < 10; i++) {
      const k = Math.floor(rand() * 2400);
      const col = 1 + Math.floor(rand() * 3);
      const text = logText({
        row: (r, c) => (r === k ? c.map((x, j) => (j === col ? `\u0001${x}\u0002` : x)) : null),
      }).text;
      rejected(
        "bad-cell",
        `binary-cell-${i}`,
        `control bytes in row ${k + 1}, column ${col + 1}`,
        bytesOf(text),
        { sentence: "binary data where a number was expected", line: 5 + k, column: col + 1 },
      );
    }
  }

  // ---- time going backwards -------------------------------------------------------------------
  {
    const rand = mulberry32(78);
    for (let i = 0; i < 12; i++) {
      const k = 10 + Math.floor(rand() * 2400);
      const back = 1 + Math.floor(rand() * 5);
      rejected(
        "time-order",
        `backwards-${i}`,
        `row ${k + 1} is stamped ${back} steps earlier`,
        bytesOf(logText({ time: (r) => String((r === k ? r - back - 1 : r) * 500) }).text),
        {
          sentence: "time goes backwards",
          line: 5 + k,
          column: 1,
        },
      );
    }
    rejected(
      "time-order",
      "backwards-foreign",
      "time backwards in a mapped column that is not first",
      bytesOf(
        logText({
          header: ["A", "B", "C", "T"],
          rows: 3000,
          row: (r, c) => [c[1] ?? "", c[2] ?? "", c[3] ?? "", String((r === 2000 ? 1 : r) * 500)],
        }).text,
      ),
      { sentence: "time goes backwards", line: 2005, column: 4 },
      { map: "time=T|us,roll=A,pitch=B,yaw=C" },
    );
  }

  // ---- sample rate out of range ---------------------------------------------------------------
  const rates: [string, number, string][] = [
    ["rate-10", 10, "the time column gives 10 Hz, outside 100 Hz – 50 kHz"],
    ["rate-99", 99, "outside 100 Hz – 50 kHz"],
    ["rate-50001", 50_001, "outside 100 Hz – 50 kHz"],
    ["rate-62500", 62_500, "the time column gives 62.5 kHz, outside 100 Hz – 50 kHz"],
    ["rate-1m", 1_000_000, "the time column gives 1000 kHz, outside 100 Hz – 50 kHz"],
  ];
  for (const [id, rate, sentence] of rates) {
    rejected(
      "rate",
      id,
      `${rate} Hz`,
      bytesOf(logText({ rateHz: rate, rows: 3000, time: (k) => String((k * 1e6) / rate) }).text),
      { sentence, column: 1 },
    );
  }
  rejected(
    "rate",
    "us-as-s",
    "µs stamps in a time_s column",
    bytesOf(logText({ header: ["time_s", ...CANONICAL.slice(1)] }).text),
    { sentence: "outside 100 Hz – 50 kHz", column: 1 },
  );
  rejected(
    "rate",
    "s-as-us",
    "second stamps in a time_us column",
    bytesOf(logText({ time: (k) => (k / 2000).toFixed(6) }).text),
    { sentence: "outside 100 Hz – 50 kHz", column: 1 },
  );
  rejected(
    "rate",
    "ms-as-us",
    "ms stamps mapped as µs",
    bytesOf(logText({ header: ["T", "A", "B", "C"], time: (k) => (k * 0.5).toFixed(1) }).text),
    { sentence: "outside 100 Hz – 50 kHz", column: 1 },
    { map: "time=T|us,roll=A,pitch=B,yaw=C" },
  );
  rejected(
    "rate",
    "constant-time",
    "every stamp the same: all rows but the first repeat a stamp",
    bytesOf(logText({ time: () => "1000" }).text),
    { sentence: "2499 of 2500 rows were dropped as damaged" },
  );

  // ---- damaged rows (the 5 % rule) and shifted cells ------------------------------------------
  rejected(
    "damaged",
    "decimal-commas",
    "decimal commas in every gyro cell (12,5)",
    bytesOf(
      logText({ row: (_k, c) => c.map((x, j) => (j >= 1 && j <= 3 ? x.replace(".", ",") : x)) })
        .text,
    ),
    {
      sentence: "the numbers probably use decimal commas (12,5) or thousands separators (21,050)",
      line: 5,
    },
  );
  rejected(
    "damaged",
    "thousands-separators",
    "thousands separators in every rpm cell (21,050)",
    bytesOf(
      logText({ row: (_k, c) => c.map((x, j) => (j >= 5 ? `${x.slice(0, 2)},${x.slice(2)}` : x)) })
        .text,
    ),
    {
      sentence: "the numbers probably use decimal commas (12,5) or thousands separators (21,050)",
      line: 5,
    },
  );
  rejected(
    "damaged",
    "decimal-commas-late",
    "decimal commas from row 1001 on (an edited file)",
    bytesOf(
      logText({
        row: (k, c) => (k >= 1000 ? c.map((x, j) => (j === 1 ? x.replace(".", ",") : x)) : null),
      }).text,
    ),
    { sentence: "the numbers probably use decimal commas", line: 1005 },
  );
  rejected(
    "damaged",
    "decimal-commas-semicolons",
    "semicolon header, decimal commas in the rows",
    bytesOf(
      logText({ rows: 50 })
        .text.replace(/,/g, ";")
        .replace(/(\d)\.(\d)/g, "$1,$2"),
    ),
    { sentence: "the columns seem separated by semicolons", line: 4 },
  );
  for (const [id, every, what] of [
    ["empty-cells-10pc", 10, "an empty cell"],
    ["empty-cells-50pc", 2, "an empty cell"],
  ] as const) {
    rejected(
      "damaged",
      id,
      `every ${every}th row has ${what}`,
      bytesOf(
        logText({ row: (k, c) => (k % every === 0 ? [c[0] ?? "", "", ...c.slice(2)] : null) }).text,
      ),
      {
        sentence:
          "rows were dropped as damaged (an empty or missing cell, a cell count other than the header's, or a repeated time stamp; first at line 5)",
      },
    );
  }
  rejected(
    "damaged",
    "short-rows-10pc",
    "every 10th row lacks its last cell",
    bytesOf(logText({ row: (k, c) => (k % 10 === 1 ? c.slice(0, -1) : null) }).text),
    {
      sentence:
        "rows were dropped as damaged (an empty or missing cell, a cell count other than the header's, or a repeated time stamp; first at line 6)",
    },
  );
  rejected(
    "damaged",
    "all-rows-short",
    "every row lacks its last two cells",
    bytesOf(logText({ row: (_k, c) => c.slice(0, -2) }).text),
    { sentence: "2500 of 2500 rows were dropped as damaged" },
  );
  rejected(
    "damaged",
    "header-only",
    "the header and no rows",
    bytesOf(META.join("\n") + "\n" + CANONICAL.join(",") + "\n"),
    { sentence: "the header is there but no sample rows follow it" },
  );
  rejected(
    "damaged",
    "header-then-blank",
    "the header and blank lines",
    bytesOf(CANONICAL.join(",") + "\n\n\n\n"),
    { sentence: "the header is there but no sample rows follow it" },
  );
  rejected("damaged", "one-row", "a single row", bytesOf(logText({ rows: 1 }).text), {
    sentence: "fewer than two complete sample rows",
  });
  rejected(
    "damaged",
    "two-rows-one-empty",
    "two rows, one of them with an empty cell",
    bytesOf(
      logText({ rows: 2, row: (k, c) => (k === 1 ? [c[0] ?? "", "", ...c.slice(2)] : null) }).text,
    ),
    { sentence: "fewer than two complete sample rows" },
  );

  // ---- the column map (before any byte is read) -----------------------------------------------
  const foreign = bytesOf(logText({ header: ["T", "A", "B", "C"], rows: 3000 }).text);
  const maps: [string, string, string][] = [
    [
      "map-twice-column",
      "time=T,roll=A,pitch=A,yaw=C",
      'the map binds the column "A" twice (to roll and to pitch)',
    ],
    ["map-twice-key", "time=T,roll=A,pitch=B,yaw=C,roll=B", "the map binds roll twice"],
    ["map-unit", "time=T|minutes,roll=A,pitch=B,yaw=C", 'unit "minutes" is not known for time'],
    ["map-key", "time=T,roll=A,pitch=B,yaw=C,speed=B", '"speed" is not a channel'],
    ["map-no-yaw", "time=T,roll=A,pitch=B", "the map needs a column for yaw"],
    ["map-motor-9", "time=T,roll=A,pitch=B,yaw=C,rpm9=B", "motors are numbered 1 to 8"],
    [
      "map-syntax",
      "time:T,roll=A,pitch=B,yaw=C",
      'map entry "time:T" must look like key=Header or key=Header|unit',
    ],
  ];
  for (const [id, map, sentence] of maps) {
    rejected(
      "map",
      id,
      `column map ${map}`,
      foreign,
      { stage: "map", code: "bad-input", sentence },
      { map },
    );
  }

  // ---- size limit -----------------------------------------------------------------------------
  rejected(
    "size",
    "over-1mib",
    "a 1.6 MB log with a 1 MiB limit",
    bytesOf(logText({ rows: 25_000 }).text),
    { code: "limit-exceeded", sentence: "the file is larger than the 1 MiB limit" },
    { maxMb: 1 },
  );
  rejected(
    "size",
    "garbage-after-limit",
    "a bad cell beyond the 1 MiB limit: the limit is met first",
    bytesOf(
      logText({
        rows: 25_000,
        row: (k, c) => (k === 24_000 ? c.map((x, j) => (j === 1 ? "zz" : x)) : null),
      }).text,
    ),
    { code: "limit-exceeded", sentence: "the file is larger than the 1 MiB limit" },
    { maxMb: 1 },
  );
  rejected(
    "size",
    "garbage-before-limit",
    "a bad cell before the 1 MiB limit: the cell is met first",
    bytesOf(
      logText({
        rows: 25_000,
        row: (k, c) => (k === 100 ? c.map((x, j) => (j === 1 ? "zz" : x)) : null),
      }).text,
    ),
    { sentence: 'expected a number, found "zz"', line: 105, column: 2 },
    { maxMb: 1 },
  );

  // ---- read, but too short to analyse ---------------------------------------------------------
  for (const [rows, rate] of [
    [300, 1000],
    [1000, 2000],
    [5000, 16000],
  ] as const) {
    rejected(
      "too-short",
      `short-${rows}-${rate}`,
      `${rows} rows at ${rate} Hz: shorter than one analysis segment`,
      bytesOf(logText({ rows, rateHz: rate }).text),
      {
        stage: "analysis",
        sentence: `the log has ${rows} samples at ${rate} Hz; one analysis segment needs`,
      },
    );
  }
  rejected(
    "too-short",
    "short-runs",
    "2,500 rows cut by gaps every 500 rows: no stretch holds a segment",
    bytesOf(logText({ time: (k) => String(k * 500 + Math.floor(k / 500) * 50_000) }).text),
    { stage: "analysis", sentence: "in one stretch without a gap" },
  );

  const ids = new Set<string>();
  for (const c of cases) {
    if (ids.has(c.id)) throw new Error(`corpus: duplicate case id ${c.id}`);
    ids.add(c.id);
  }
  return cases;
}

/** The corpus as a Markdown table: id, family, what, expected outcome. */
export function corpusTable(cases: readonly CorpusCase[]): string {
  const rows = cases.map((c) => {
    const e = c.expect;
    const outcome =
      e.outcome === "accepted"
        ? `accepted${e.samples !== undefined ? `, ${e.samples} samples` : ""}${e.sampleRateHz !== undefined ? `, ${e.sampleRateHz} Hz` : ""}${e.gaps !== undefined ? `, ${e.gaps} gaps` : ""}${e.droppedRows !== undefined ? `, ${e.droppedRows} dropped` : ""}`
        : `rejected (${e.stage}, ${e.code})${e.line !== undefined ? ` line ${e.line}` : ""}${e.column !== undefined ? ` column ${e.column}` : ""}: “${e.sentence}”`;
    const options = [c.map ? `map \`${c.map}\`` : "", c.maxMb ? `limit ${c.maxMb} MiB` : ""]
      .filter(Boolean)
      .join(", ");
    return `| ${c.id} | ${c.family} | ${c.what.replace(/\|/g, "\\|")}${options ? ` (${options.replace(/\|/g, "\\|")})` : ""} | ${c.bytes.length} | ${outcome.replace(/\|/g, "\\|")} |`;
  });
  return [
    "# Malformed-log corpus (generated by test/reliability/corpus.ts; do not edit)",
    "",
    `${cases.length} cases: ${cases.filter((c) => c.expect.outcome === "accepted").length} accepted, ${cases.filter((c) => c.expect.outcome === "rejected").length} rejected.`,
    "",
    "| id | family | what | bytes | expected |",
    "|---|---|---|---|---|",
    ...rows,
    "",
  ].join("\n");
}

/** Writes every case as `<id>.csv` and an index.json of the expectations into `dir`. */
export function writeCorpus(dir: string, cases: readonly CorpusCase[] = buildCorpus()): void {
  mkdirSync(dir, { recursive: true });
  for (const c of cases) writeFileSync(join(dir, `${c.id}.csv`), c.bytes);
  const index = cases.map(({ bytes, ...rest }) => ({
    ...rest,
    file: `${rest.id}.csv`,
    size: bytes.length,
  }));
  writeFileSync(join(dir, "index.json"), JSON.stringify(index, null, 2) + "\n");
}

if (process.argv[1] && /corpus\.ts$/.test(process.argv[1])) {
  const [flag, dir] = process.argv.slice(2);
  if (flag === "--table") process.stdout.write(corpusTable(buildCorpus()));
  else if (flag === "--write" && dir) writeCorpus(dir);
  else process.stderr.write("usage: npx tsx test/reliability/corpus.ts --table | --write <dir>\n");
}
