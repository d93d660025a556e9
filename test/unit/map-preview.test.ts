import { describe, expect, it } from "vitest";
import { channelFor, proposeColumnMap } from "@/lib/logs/columns";
import { convertedValue, draftOf, draftToMap, mapKeys, previewRows } from "@/lib/logs/map-preview";

// The column-map table's arithmetic. Unit definitions: 1 rad = 180/π deg (SI), 1 Hz of rotation =
// 60 rev/min (SI), RC throttle pulses span 1000–2000 µs (common practice of the trade).
describe("converted preview values", () => {
  it("time from the first row, in seconds", () => {
    expect(convertedValue(channelFor("time", "us"), 1_000_250, 1_000_000)).toBeCloseTo(0.00025, 12);
    expect(convertedValue(channelFor("time", "ms"), 12.5, 10)).toBeCloseTo(0.0025, 12);
  });
  it("rates in deg/s, throttle 0..1, rpm", () => {
    expect(convertedValue(channelFor("roll", "rad/s"), Math.PI)).toBeCloseTo(180, 12);
    expect(convertedValue(channelFor("throttle", "pulse-us"), 1500)).toBe(0.5);
    expect(convertedValue(channelFor("throttle", "percent"), 42)).toBe(0.42);
    expect(convertedValue(channelFor("rpm2", "hz"), 350)).toBe(21000);
  });
});

describe("the map draft", () => {
  it("round-trips a map text and says what is missing", () => {
    const text = "time=clock us|us,roll=rate X rad|rad/s,pitch=rate Y rad|rad/s";
    const draft = draftOf(text);
    expect(draft.roll).toEqual({ header: "rate X rad", unit: "rad/s" });
    const { mapText, problem } = draftToMap(draft);
    expect(mapText).toBe(text);
    expect(problem).toBe("the map needs a column for yaw");
    expect(
      draftToMap({ ...draft, yaw: { header: "turn rate rad", unit: "rad/s" } }).problem,
    ).toBeNull();
  });
  it("keeps the good entries when one is bad, and names a column bound twice", () => {
    const draft = draftOf("time=t|us,bogus=x|y,roll=a|deg/s");
    expect(Object.keys(draft)).toEqual(["time", "roll"]);
    expect(
      draftToMap({
        ...draft,
        pitch: { header: "a", unit: "deg/s" },
        yaw: { header: "c", unit: "deg/s" },
      }).problem,
    ).toMatch(/binds the column "a" twice/);
  });
  it("lists at least four motors and every needed field", () => {
    const keys = mapKeys(2).map((k) => k.key);
    expect(keys.slice(0, 4)).toEqual(["time", "roll", "pitch", "yaw"]);
    expect(keys).toContain("rpm4");
    expect(mapKeys(6).map((k) => k.key)).toContain("rpm6");
  });
});

describe("the head's first rows and the guesses they allow", () => {
  const text = "# airframe: X\nclock us,rate X rad,esc1 Hz\n100,0.5,300\n350,0.25,301\n600,0.1,30";
  it("reads whole rows only (the head slice may end mid-row)", () => {
    expect(previewRows(text, 2)).toEqual([
      [100, 0.5, 300],
      [350, 0.25, 301],
    ]);
  });
  it("tells time by a unit in the name and rising values, motor speed by esc and Hz", () => {
    const p = proposeColumnMap(["clock us", "rate X rad", "esc1 Hz"], previewRows(text, 2));
    expect(p.guesses[0]).toBe(
      '"clock us" read as time in us (us in the name and its values only rise)',
    );
    expect(p.map.find((b) => b.channel.kind === "rpm")?.header).toBe("esc1 Hz");
    // Without rows nothing tells that "clock us" is a clock.
    expect(proposeColumnMap(["clock us", "rate X rad"]).missing).toContain("time");
  });
});
