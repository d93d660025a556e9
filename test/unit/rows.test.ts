import { describe, expect, it } from "vitest";
import { LogFormatError } from "@/lib/errors";
import { makeLayout } from "@/lib/logs/column-layout";
import { canonicalMap, parseColumnMap } from "@/lib/logs/columns";
import { MAX_LISTED_GAPS, PROBE_ROWS, RowReader } from "@/lib/logs/rows";
import { blockShapeOf, newSampleBlock, type Gap, type LogInfo } from "@/lib/logs/types";

// The row core on its own, on rows of heatcheck's canonical format (README, "Log format"); the
// expected values are the rows' own numbers, converted by the documented unit factors.
const enc = new TextEncoder();
const HEADERS = ["time_us", "gyro_roll", "gyro_pitch", "gyro_yaw", "throttle", "rpm_1"];

function rowReader(blockRows = 8192, headers = HEADERS, mapText?: string) {
  const map = mapText ? parseColumnMap(mapText) : canonicalMap(headers);
  if (!map) throw new Error("test headers need a map");
  const seen = {
    infos: [] as LogInfo[],
    blocks: [] as number[],
    roll: [] as number[],
    time: [] as number[],
    throttle: [] as number[],
    rpm: [] as number[],
    gaps: [] as Gap[],
    beganAfterRows: -1,
  };
  const reader = new RowReader(
    makeLayout(headers, map, 1),
    {
      begin: (info) => seen.infos.push(info),
      block: (b) => {
        seen.blocks.push(b.length);
        for (let k = 0; k < b.length; k++) {
          seen.roll.push(b.gyro[0][k] ?? NaN);
          seen.time.push(b.timeS[k] ?? NaN);
          if (b.throttle) seen.throttle.push(b.throttle[k] ?? NaN);
          if (b.rpm[0]) seen.rpm.push(b.rpm[0][k] ?? NaN);
        }
      },
      gap: (g) => seen.gaps.push(g),
    },
    { blockRows, metadata: { airframe: "T-1" }, guesses: [], headerLine: 1 },
  );
  const feed = (text: string) => {
    const bytes = enc.encode(text);
    reader.lines(bytes, 0, bytes.length);
  };
  return { reader, seen, feed };
}

const rowsText = (n: number, stepUs = 250, from = 0) =>
  Array.from(
    { length: n },
    (_, k) => `${(from + k) * stepUs},${(k % 9) - 4},0.5,-1,0.25,${20000 + k}\n`,
  ).join("");

describe("the row core", () => {
  it("holds the first rows until the rate is told, then hands on blocks of at most blockRows", () => {
    const { reader, seen, feed } = rowReader(1000);
    feed(rowsText(PROBE_ROWS - 1));
    expect(seen.infos).toEqual([]); // not yet: the rate comes from PROBE_ROWS rows
    feed(rowsText(1, 250, PROBE_ROWS - 1));
    expect(seen.infos).toHaveLength(1);
    expect(seen.infos[0]).toMatchObject({
      sampleRateHz: 4000,
      metadata: { airframe: "T-1" },
      hasThrottle: true,
      motors: [1],
      hasSetpoint: false,
    });
    feed(rowsText(2500, 250, PROBE_ROWS));
    const summary = reader.finish(1234);
    expect(summary).toMatchObject({ samples: PROBE_ROWS + 2500, bytes: 1234, droppedRows: 0 });
    expect(summary.durationS).toBeCloseTo((PROBE_ROWS + 2500) / 4000, 12);
    expect(seen.blocks[0]).toBe(PROBE_ROWS);
    expect(Math.max(...seen.blocks.slice(1))).toBeLessThanOrEqual(1000);
    expect(seen.roll.slice(0, 10)).toEqual([-4, -3, -2, -1, 0, 1, 2, 3, 4, -4]);
    expect(seen.time[4]).toBeCloseTo(1e-3, 15);
    expect(seen.throttle[0]).toBe(0.25);
    expect(seen.rpm[3]).toBe(20003);
    expect(reader.line).toBe(1 + PROBE_ROWS + 2500);
  });

  it("converts the units of a map: ms to s, rad/s to deg/s, pulse width to a fraction, Hz to rev/min", () => {
    const headers = ["ms", "a", "b", "c", "pulse", "hz"];
    const { reader, seen, feed } = rowReader(
      8192,
      headers,
      "time=ms|ms,roll=a|rad/s,pitch=b,yaw=c,throttle=pulse|pulse-us,rpm1=hz|hz",
    );
    feed(Array.from({ length: 600 }, (_, k) => `${k * 0.5},${Math.PI},0,0,1750,350\n`).join(""));
    reader.finish(0);
    expect(seen.infos[0]?.sampleRateHz).toBe(2000);
    expect(seen.roll[0]).toBeCloseTo(180, 12);
    expect(seen.throttle[0]).toBe(0.75);
    expect(seen.rpm[0]).toBe(21000);
  });

  it("skips blank lines; drops incomplete rows, empty cells and repeated stamps, with their lines", () => {
    const { reader, feed } = rowReader();
    feed(rowsText(100) + "\n\r\n" + "25000,1,2\n" + "25250,1,,3,0.2,1\n" + "25250,1,2,3,0.2,1\n");
    feed("25250,1,2,3,0.2,1\n" + rowsText(500, 250, 102));
    const s = reader.finish(0);
    expect(s.samples).toBe(100 + 1 + 500);
    expect(s.droppedRows).toBe(3);
    expect(s.droppedLines).toEqual([104, 105, 107]);
  });

  it("splits at a step over 2.5 periods, within a block and between two blocks", () => {
    const { reader, seen, feed } = rowReader(500);
    feed(rowsText(PROBE_ROWS) + rowsText(1000, 250, PROBE_ROWS + 3)); // a hole of 3 periods
    feed(rowsText(500, 250, PROBE_ROWS + 1003 + 10).replace(/^/, "")); // and one of 10 at a block edge
    const s = reader.finish(0);
    expect(s.gapCount).toBe(2);
    expect(s.gaps.map((g) => [g.line, g.lengthS])).toEqual([
      [2 + PROBE_ROWS, 0.001],
      [2 + PROBE_ROWS + 1000, 0.00275],
    ]);
    expect(seen.gaps).toEqual(s.gaps);
    expect(MAX_LISTED_GAPS).toBe(1000);
  });

  it("throws the line and column of a bad cell and of time going backwards", () => {
    const bad = rowReader();
    expect(() => bad.feed(rowsText(3) + "750,1,x,3,0.2,1\n")).toThrow(
      'line 5, column 3 (gyro_pitch): expected a number, found "x"',
    );
    const back = rowReader();
    expect(() => back.feed(rowsText(3) + "100,1,2,3,0.2,1\n")).toThrow(
      new LogFormatError(
        "time goes backwards (0.0001 s after 0.0005 s); logs must be in time order",
        { line: 5, column: 1, columnName: "time_us" },
      ),
    );
  });

  it("refuses a file with no rows or more than 5 % damaged rows", () => {
    expect(() => rowReader().reader.finish(0)).toThrow(
      "the header is there but no sample rows follow it",
    );
    const damaged = rowReader();
    damaged.feed(
      rowsText(100).replace(/,20000\n|,20001\n|,20002\n|,20003\n|,20004\n|,20005\n/g, ",\n"),
    );
    expect(() => damaged.reader.finish(0)).toThrow(/6 of 100 rows were dropped as damaged/);
  });
});

describe("an empty sample block", () => {
  it("has room for the rows asked and arrays only for the channels a log has", () => {
    const b = newSampleBlock(
      64,
      blockShapeOf({ hasThrottle: false, motors: [1, 2, 4], hasSetpoint: true }),
    );
    expect(b.length).toBe(0);
    expect(b.timeS).toHaveLength(64);
    expect(b.gyro.map((g) => g.length)).toEqual([64, 64, 64]);
    expect(b.throttle).toBeNull();
    expect(b.rpm).toHaveLength(3);
    expect(b.setpoint?.[2]).toHaveLength(64);
    const copy = newSampleBlock(8, {
      throttle: b.throttle !== null,
      motors: b.rpm.length,
      setpoint: false,
    });
    expect([copy.throttle, copy.rpm.length, copy.setpoint]).toEqual([null, 3, null]);
  });
});
