import { describe, expect, it } from "vitest";
import { bytesSource } from "@/lib/analysis/analyze-log";
import { LimitExceededError, LogFormatError } from "@/lib/errors";
import { readLog } from "@/lib/logs/read-log";
import { matchAirframe, readLogHead, sniffLogHead } from "@/lib/logs/sniff";

// The head of a log (metadata and header) as heatcheck's own log format defines it (README, "Log
// format"); the head reader must judge a file the same way the full reader does.
const enc = new TextEncoder();
const HEADER = "time_us,gyro_roll,gyro_pitch,gyro_yaw";
const rows = Array.from({ length: 3000 }, (_, k) => `${k * 500},1,2,3\n`).join("");
const noRows = { begin: () => undefined, block: () => undefined, gap: () => undefined };

async function headFailure(bytes: Uint8Array, options = {}): Promise<Error> {
  try {
    await readLogHead(bytesSource(bytes, 1000), options);
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected the head to be refused");
}

describe("matching a file to an airframe", () => {
  const names = ["HV-01", "HV-1", "Kite 3"];
  it("prefers the # airframe: line, then the longest name in the file name", () => {
    expect(matchAirframe(names, { metadataAirframe: "hv-01", fileName: "whatever.csv" })).toEqual({
      name: "HV-01",
      how: "metadata",
    });
    expect(matchAirframe(names, { fileName: "heat2_HV-01_2026.csv" })).toEqual({
      name: "HV-01",
      how: "file name",
    });
    expect(matchAirframe(names, { fileName: "kite_3-heat1.csv" })).toEqual({
      name: "Kite 3",
      how: "file name",
    });
    expect(matchAirframe(names, { metadataAirframe: "Unknown", fileName: "log.csv" })).toBeNull();
  });
});

describe("the head of a log from text (a slice of a file in the browser)", () => {
  it("reads metadata and header; a byte-order mark and blank lines before the header are allowed", () => {
    const head = sniffLogHead(
      `\uFEFF# airframe: HV-01\n# flown_at: 2026-11-28T14:05:00Z\n\n${HEADER}\n0,1,2,3\n`,
    );
    expect(head?.metadata).toEqual({ airframe: "HV-01", flown_at: "2026-11-28T14:05:00Z" });
    expect(head?.canonical).toBe(true);
    expect(head?.line).toBe(4);
    expect(head?.proposal.guesses).toEqual([]);
  });
  it("is null when the header is not in the slice or the slice is not a log head", () => {
    expect(sniffLogHead("# only comments\n")).toBeNull();
    expect(sniffLogHead("# airframe: X\ntime_us,gyro_ro")).toBeNull(); // header line not ended
    expect(sniffLogHead("0,1,2,3\n1000,1,2,3\n")).toBeNull(); // numbers, not column names
  });
  it("proposes a map for foreign headers and says they are not canonical", () => {
    const head = sniffLogHead("time [ms],body rate roll,body rate pitch,body rate yaw\n0,1,2,3\n");
    expect(head?.canonical).toBe(false);
    expect(head?.proposal.missing).toEqual([]);
    expect(head?.proposal.map.map((b) => b.header)).toEqual([
      "time [ms]",
      "body rate roll",
      "body rate pitch",
      "body rate yaw",
    ]);
  });
});

describe("the head of a log from a byte stream", () => {
  it("finds the header after 10,000 metadata lines or a 70 KB note, like the reader", async () => {
    const meta =
      Array.from({ length: 10_000 }, (_, i) => `# k${i}: v`).join("\n") +
      `\n# note: ${"n".repeat(70_000)}\n`;
    const bytes = enc.encode(meta + HEADER + "\n" + rows);
    const head = await readLogHead(bytesSource(bytes, 32 * 1024));
    expect(head).toMatchObject({
      line: 10_002,
      headers: ["time_us", "gyro_roll", "gyro_pitch", "gyro_yaw"],
      canonical: true,
    });
    expect(head.metadata.note?.length).toBe(70_000);
    expect((await readLog(bytesSource(bytes, 32 * 1024), noRows)).samples).toBe(3000);
    expect(sniffLogHead(new TextDecoder().decode(bytes))?.line).toBe(10_002);
  });
  it("stops reading at the header row and closes the stream", async () => {
    const bytes = enc.encode(`# airframe: A-1\n${HEADER}\n${rows}`);
    let served = 0;
    let closed = false;
    const source: AsyncIterable<Uint8Array> = {
      [Symbol.asyncIterator]() {
        const inner = bytesSource(bytes, 100)[Symbol.asyncIterator]();
        return {
          next: async () => {
            const r = await inner.next();
            if (!r.done) served++;
            return r;
          },
          return: () => {
            closed = true;
            return Promise.resolve({ done: true as const, value: undefined });
          },
        };
      },
    };
    const head = await readLogHead(source);
    expect(head.metadata).toEqual({ airframe: "A-1" });
    // The header ends at byte 54, but the first 512 bytes are held to tell the file's kind
    // (preamble.ts): 6 chunks of 100 bytes, of the file's 360.
    expect(served).toBe(6);
    expect(Math.ceil(bytes.length / 100)).toBeGreaterThan(300);
    expect(closed).toBe(true);
  });
  it("refuses a file without a head with the reader's own sentence", async () => {
    expect((await headFailure(new Uint8Array(0))).message).toBe("the file is empty");
    expect((await headFailure(enc.encode("# airframe: X\n# note: y\n"))).message).toMatch(
      /^no header row was found/,
    );
    const { gzipSync } = await import("node:zlib");
    expect((await headFailure(new Uint8Array(gzipSync(HEADER + "\n" + rows)))).message).toMatch(
      /^the file is gzip-compressed/,
    );
    expect(await headFailure(enc.encode("# x: y\n".repeat(100)), { maxBytes: 300 })).toBeInstanceOf(
      LimitExceededError,
    );
    expect(await headFailure(enc.encode("0,1,2,3\n"))).toBeInstanceOf(LogFormatError);
  });
});
