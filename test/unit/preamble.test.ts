import { describe, expect, it } from "vitest";
import { LogFormatError } from "@/lib/errors";
import {
  MAX_PREAMBLE_BYTES,
  Preamble,
  metadataEntry,
  nonTextKind,
  separatorHint,
  splitHeader,
} from "@/lib/logs/preamble";

// The preamble is heatcheck's own format (README, "Log format": `# key: value` lines, then one
// header row). File kinds by their magic numbers: gzip 1f 8b (RFC 1952 §2.3.1), zip "PK\x03\x04"
// (PKWARE APPNOTE §4.3.7), byte-order marks (Unicode Standard §23.8).
const enc = new TextEncoder();

/** Reads text line by line through one Preamble until the header arrives. */
function readPreamble(text: string | Uint8Array): Preamble {
  const bytes = typeof text === "string" ? enc.encode(text) : text;
  const p = new Preamble();
  let pos = 0;
  while (pos < bytes.length && !p.found) pos = p.read(bytes, pos, bytes.length);
  return p;
}

function refusal(text: string | Uint8Array): LogFormatError {
  try {
    readPreamble(text);
  } catch (e) {
    if (e instanceof LogFormatError) return e;
    throw e;
  }
  throw new Error("expected the preamble to be refused");
}

describe("what kind of file it is, from its first bytes", () => {
  it("names gzip, zip, UTF-32 and UTF-16 (with a mark, or by its NULs without one)", () => {
    expect(nonTextKind(new Uint8Array([0x1f, 0x8b, 8, 0]))).toMatch(/^the file is gzip-compressed/);
    expect(nonTextKind(enc.encode("PK\u0003\u0004rest"))).toMatch(/^the file is a zip archive/);
    expect(nonTextKind(new Uint8Array([0xff, 0xfe, 0, 0, 0x74, 0, 0, 0]))).toMatch(/UTF-32/);
    expect(nonTextKind(new Uint8Array([0, 0, 0xfe, 0xff]))).toMatch(/UTF-32/);
    expect(nonTextKind(new Uint8Array([0xfe, 0xff, 0, 0x74]))).toMatch(/UTF-16/);
    const le = new Uint8Array(40).map((_, i) => (i % 2 === 0 ? 0x61 : 0));
    expect(nonTextKind(le)).toMatch(/UTF-16/);
    expect(nonTextKind(le.subarray(1))).toMatch(/UTF-16/); // big-endian: the NUL comes first
  });
  it("takes UTF-8 text (with or without its byte-order mark) for text", () => {
    expect(nonTextKind(enc.encode("time_us,gyro_roll\n"))).toBeNull();
    expect(nonTextKind(enc.encode("\uFEFF# note: µ and ° are fine\n"))).toBeNull();
    expect(nonTextKind(new Uint8Array(0))).toBeNull();
  });
});

describe("one metadata line and one header line", () => {
  it("a `# key: value` line gives its key lower-cased and its value trimmed; a plain comment gives null", () => {
    expect(metadataEntry("# Airframe:  HV-03  ")).toEqual(["airframe", "HV-03"]);
    expect(metadataEntry("#flown_at: 2026-11-28T14:05:00Z")).toEqual([
      "flown_at",
      "2026-11-28T14:05:00Z",
    ]);
    expect(metadataEntry("# note:")).toEqual(["note", ""]);
    expect(metadataEntry("# just a comment")).toBeNull();
    expect(metadataEntry("# two words: x")).toBeNull();
  });
  it("a header splits at commas, trimmed, with one pair of double quotes removed", () => {
    expect(splitHeader(' time_us , "gyro_roll",gyro_pitch ,""q""')).toEqual([
      "time_us",
      "gyro_roll",
      "gyro_pitch",
      '"q"',
    ]);
  });
  it("a one-column header separated by semicolons or tabs gets a hint", () => {
    expect(separatorHint("time_us;gyro_roll")).toMatch(/semicolons/);
    expect(separatorHint("time_us\tgyro_roll")).toMatch(/tabs/);
    expect(separatorHint("time_us,gyro_roll;x")).toBe("");
    expect(separatorHint("time_us")).toBe("");
  });
});

describe("the preamble, line by line", () => {
  it("keeps metadata, skips blank lines and comments, and finds the header with its line", () => {
    const p = readPreamble(
      "\uFEFF# airframe: HV-03\r\n\n# a plain comment\n   \n# note: heat 2\ntime_us,gyro_roll,gyro_pitch,gyro_yaw\r\n0,1,2,3\n",
    );
    expect(p.found?.head).toEqual({
      metadata: { airframe: "HV-03", note: "heat 2" },
      headers: ["time_us", "gyro_roll", "gyro_pitch", "gyro_yaw"],
      line: 6,
    });
    expect(p.found?.text).toBe("time_us,gyro_roll,gyro_pitch,gyro_yaw");
    expect(p.line).toBe(6);
  });
  it("refuses a first line of numbers, binary data and text that is not UTF-8, naming the line", () => {
    expect(refusal("# a: 1\n0,1.5,2,3\n").message).toBe(
      "line 2: the first line holds numbers, not column names: add a header row such as time_us,gyro_roll,gyro_pitch,gyro_yaw",
    );
    expect(refusal("# a: 1\n# b\u0001\n").message).toBe(
      "line 2: the file holds binary data, not CSV text",
    );
    expect(refusal(new Uint8Array([0x23, 0x20, 0xc3, 0x28, 10])).message).toMatch(
      /^line 1: the file holds binary data or an unknown text encoding, not UTF-8 CSV/,
    );
  });
  it("refuses a header that does not start within MAX_PREAMBLE_BYTES", () => {
    const line = `# ${"c".repeat(1021)}\n`; // 1 KiB a line
    const lines = MAX_PREAMBLE_BYTES / line.length;
    const e = refusal(line.repeat(lines) + "time_us,gyro_roll,gyro_pitch,gyro_yaw\n");
    expect(e.message).toBe(
      `line ${lines + 1}: no header row in the first 4 MiB: after the # metadata lines, the first line must name the columns`,
    );
    const fits = readPreamble(line.repeat(lines - 1) + "time_us,gyro_roll,gyro_pitch,gyro_yaw\n");
    expect(fits.found?.head.line).toBe(lines);
  });
});
