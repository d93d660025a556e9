import { describe, expect, it } from "vitest";
import { mulberry32 } from "@/lib/demo/random";
import { LogFormatError } from "@/lib/errors";
import { KIND_PROBE_BYTES, LineFramer, firstLongLine } from "@/lib/logs/line-framer";
import { MAX_LINE_BYTES } from "@/lib/logs/preamble";

// Line endings as RFC 4180 §2 writes CSV lines (CRLF), plus LF (POSIX text) and a lone CR (classic
// Mac OS text, common practice in old exports); magic numbers as in preamble.test.ts.
const enc = new TextEncoder();
const dec = new TextDecoder();

/** A consumer that records every line it is handed, as text with its ending. */
function recorder(stopAfter = Infinity) {
  const lines: string[] = [];
  let longLines = 0;
  const framer = new LineFramer({
    lines: (bytes, start, end) => {
      expect(bytes[end - 1]).toBe(10);
      let pos = start;
      while (pos < end && lines.length < stopAfter) {
        const eol = bytes.indexOf(10, pos);
        lines.push(dec.decode(bytes.subarray(pos, eol + 1)));
        pos = eol + 1;
      }
    },
    stopped: () => lines.length >= stopAfter,
    longLine: () => {
      longLines++;
      return new LogFormatError(`line ${lines.length + 1} is too long`);
    },
  });
  return { framer, lines, longLines: () => longLines };
}

function frame(bytes: Uint8Array, cuts: number[]): string[] {
  const r = recorder();
  let at = 0;
  for (const size of cuts) {
    r.framer.push(bytes.subarray(at, at + size));
    at += size;
  }
  r.framer.push(bytes.subarray(at));
  r.framer.end();
  return r.lines;
}

describe("line framing", () => {
  const text = Array.from({ length: 400 }, (_, k) => `${k * 250},${k % 7},-${k % 3}.5\n`).join("");
  const bytes = enc.encode(text + "99999,1,2"); // the last line has no line ending

  it("hands on the same lines whatever the chunk sizes (1 byte, 7 bytes, 200 seeded random cuts)", () => {
    const whole = frame(bytes, []);
    expect(whole).toHaveLength(401);
    expect(whole[400]).toBe("99999,1,2\n"); // completed at the end of the input
    expect(
      frame(
        bytes,
        Array.from({ length: bytes.length }, () => 1),
      ),
    ).toEqual(whole);
    expect(
      frame(
        bytes,
        Array.from({ length: bytes.length / 7 }, () => 7),
      ),
    ).toEqual(whole);
    const rand = mulberry32(21);
    expect(
      frame(
        bytes,
        Array.from({ length: 200 }, () => Math.floor(rand() * 60)),
      ),
    ).toEqual(whole);
  });

  it("reads lone CRs as line feeds, and leaves CRLF as it is", () => {
    const cr = enc.encode("a,b\rc,d\re,f\r");
    expect(frame(cr, [3, 1, 2])).toEqual(["a,b\n", "c,d\n", "e,f\n"]);
    const crlf = enc.encode("a,b\r\nc,d\r\n");
    expect(frame(crlf, [4])).toEqual(["a,b\r\n", "c,d\r\n"]);
  });

  it("holds the first bytes until the file's kind is known, then refuses what is not text", () => {
    const gzip = new Uint8Array([0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 10, 65, 66, 10]);
    const r = recorder();
    r.framer.push(gzip); // fewer than KIND_PROBE_BYTES: held, nothing decided yet
    expect(r.lines).toEqual([]);
    expect(() => r.framer.end()).toThrow(/^the file is gzip-compressed/);
    const zip = enc.encode("PK\u0003\u0004" + "x,y\n".repeat(KIND_PROBE_BYTES));
    expect(() => recorder().framer.push(zip)).toThrow(/^the file is a zip archive/);
  });

  it("settle() decides on the bytes so far (a slice of a file)", () => {
    const r = recorder();
    r.framer.push(enc.encode("# a: 1\ntime_us,x\n"));
    expect(r.lines).toEqual([]);
    r.framer.settle();
    expect(r.lines).toEqual(["# a: 1\n", "time_us,x\n"]);
  });

  it("refuses a line over MAX_LINE_BYTES after handing on the lines before it, at any chunk size", () => {
    const ok = enc.encode(`a\n${"n".repeat(MAX_LINE_BYTES)}\r\nb\n`);
    expect(frame(ok, [4096])).toHaveLength(3);
    const long = enc.encode(`a\n${"n".repeat(MAX_LINE_BYTES + 1)}\nb\n`);
    for (const chunk of [long.length, 1 << 16, 999]) {
      const r = recorder();
      let error: unknown;
      try {
        for (let at = 0; at < long.length; at += chunk)
          r.framer.push(long.subarray(at, at + chunk));
        r.framer.end();
      } catch (e) {
        error = e;
      }
      expect((error as Error).message).toBe("line 2 is too long");
      expect(r.lines).toEqual(["a\n"]);
      expect(r.longLines()).toBe(1);
    }
  });

  it("hands on nothing more once the consumer has stopped", () => {
    const r = recorder(2);
    r.framer.push(enc.encode("one\ntwo\nthree\n".padEnd(KIND_PROBE_BYTES + 10, "x")));
    r.framer.end();
    expect(r.lines).toEqual(["one\n", "two\n"]);
  });
});

describe("the first line over the length limit", () => {
  it("is found by its start, with the line ending excluded from its length", () => {
    const n = MAX_LINE_BYTES;
    const b = enc.encode(`ab\n${"x".repeat(n)}\r\n${"y".repeat(n + 1)}\n`);
    expect(firstLongLine(b, 0, b.length)).toBe(3 + n + 2);
    expect(firstLongLine(b, 0, 3 + n + 2)).toBe(-1);
  });
});
