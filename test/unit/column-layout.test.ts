import { describe, expect, it } from "vitest";
import { InputError, LogFormatError } from "@/lib/errors";
import {
  boundMap,
  chooseMap,
  degPerSecondPer,
  makeLayout,
  rpmPer,
  secondsPer,
  throttleConversion,
  throttleUnitOf,
} from "@/lib/logs/column-layout";
import { parseColumnMap } from "@/lib/logs/columns";

// Unit factors: SI prefixes (BIPM SI Brochure, 9th ed., §3: µ = 1e-6, m = 1e-3); 1 rad = 180/π
// degrees; 1 Hz of shaft rotation = 60 rev/min. Throttle scales are common practice for flight
// controllers (from memory): a fraction 0..1, percent 0..100, or a servo-style pulse 1000..2000 µs.

const CANONICAL = ["time_us", "gyro_roll", "gyro_pitch", "gyro_yaw"];

describe("the map a reader uses", () => {
  it("is the explicit map, else the canonical one, else the proposal with its guesses", () => {
    const explicit = parseColumnMap("time=T|ms,roll=A,pitch=B,yaw=C");
    expect(chooseMap(["T", "A", "B", "C"], "T,A,B,C", { map: explicit }, 1)).toEqual({
      map: explicit,
      guesses: [],
    });
    const canonical = chooseMap(CANONICAL, CANONICAL.join(","), {}, 3);
    expect(canonical.guesses).toEqual([]);
    expect(canonical.map.map((b) => b.header)).toEqual(CANONICAL);
    const foreign = ["time (us)", "gyro x", "gyro y", "gyro z"];
    const guessed = chooseMap(foreign, foreign.join(","), {}, 1);
    expect(guessed.map).toHaveLength(4);
    expect(guessed.guesses).toHaveLength(4);
  });
  it("is refused at the header's line when guessing is off or a required column is missing", () => {
    const foreign = ["time (us)", "gyro x", "gyro y", "gyro z"];
    expect(() => chooseMap(foreign, foreign.join(","), { allowGuess: false }, 4)).toThrow(
      "line 4: no column for time, roll, pitch, yaw: name the columns time_us, gyro_roll, gyro_pitch, gyro_yaw, or give a column map",
    );
    expect(() => chooseMap(["time_us;gyro_roll"], "time_us;gyro_roll", {}, 1)).toThrow(
      /^line 1: no column for pitch, yaw: .* \(the columns seem separated by semicolons/,
    );
  });
});

describe("the column layout", () => {
  it("gives each bound column a slot and the factor to heatcheck's units", () => {
    const headers = ["clock", "unused", "rz", "ry", "rx", "thr", "m2", "m1"];
    const map = parseColumnMap(
      "time=clock|ms,roll=rx|rad/s,pitch=ry|rad/s,yaw=rz,throttle=thr|percent,rpm2=m2|hz,rpm1=m1",
    );
    const layout = makeLayout(headers, map, 1);
    expect(layout.slots).toBe(7);
    expect(Array.from(layout.slotOfColumn)[1]).toBe(-1);
    expect(layout.time).toEqual({ slot: 0, column: 0, scale: 1e-3 });
    expect(layout.gyro.map((g) => g.column)).toEqual([4, 3, 2]);
    expect(layout.gyro[0].scale).toBe(180 / Math.PI);
    expect(layout.gyro[2].scale).toBe(1);
    expect(layout.throttle).toMatchObject({ column: 5, unit: "percent" });
    // Motors in motor order whatever the map's order: rpm blocks follow LogInfo.motors.
    expect(layout.rpm.map((m) => [m.motor, m.column, m.scale])).toEqual([
      [1, 7, 1],
      [2, 6, 60],
    ]);
    expect(layout.rpm[0]?.slot).toBeLessThan(layout.rpm[1]?.slot ?? 0);
    expect(layout.setpoint).toBeNull();
  });
  it("reads setpoints only when all three axes have a column", () => {
    const headers = [...CANONICAL, "setpoint_roll", "setpoint_pitch", "setpoint_yaw"];
    const all = parseColumnMap(
      "time=time_us,roll=gyro_roll,pitch=gyro_pitch,yaw=gyro_yaw,setpoint_roll=setpoint_roll,setpoint_pitch=setpoint_pitch,setpoint_yaw=setpoint_yaw|rad/s",
    );
    const layout = makeLayout(headers, all, 1);
    expect(layout.setpoint?.map((s) => s.scale)).toEqual([1, 1, 180 / Math.PI]);
    const two = all.filter((b) => b.header !== "setpoint_yaw");
    const partial = makeLayout(headers, two, 1);
    expect(partial.setpoint).toBeNull();
    expect(partial.slots).toBe(4);
    expect(partial.map.some((b) => b.channel.kind === "setpoint")).toBe(false);
  });
  it("is refused when the map names a column the header lacks, or lacks a required channel", () => {
    const map = parseColumnMap("time=T,roll=R,pitch=P,yaw=Y");
    expect(() => makeLayout(["T", "R", "P"], map, 7)).toThrow(
      new LogFormatError('the map names a column "Y" for yaw, but the header has no such column', {
        line: 7,
      }),
    );
    expect(() => makeLayout(["T", "R"], map.slice(0, 2), 1)).toThrow(InputError);
  });
});

describe("unit conversion", () => {
  it("time to seconds, rates to deg/s, rpm columns to rev/min", () => {
    expect([secondsPer("us"), secondsPer("ms"), secondsPer("s")]).toEqual([1e-6, 1e-3, 1]);
    expect(degPerSecondPer("rad/s") * Math.PI).toBeCloseTo(180, 12);
    expect(degPerSecondPer("deg/s")).toBe(1);
    expect([rpmPer("hz"), rpmPer("rpm")]).toEqual([60, 1]);
  });
  it("throttle to a 0..1 fraction from each scale", () => {
    expect(throttleConversion("fraction")(0.42)).toBe(0.42);
    expect(throttleConversion("percent")(42)).toBeCloseTo(0.42, 15);
    expect(throttleConversion("pulse-us")(1000)).toBe(0);
    expect(throttleConversion("pulse-us")(1500)).toBe(0.5);
    expect(throttleConversion("pulse-us")(2000)).toBe(1);
  });
  it("an auto throttle's scale is told from its largest first value", () => {
    expect(throttleUnitOf(1)).toBe("fraction");
    expect(throttleUnitOf(1.0001)).toBe("fraction"); // rounding slack of 1e-4
    expect(throttleUnitOf(1.01)).toBe("percent");
    expect(throttleUnitOf(100)).toBe("percent");
    expect(throttleUnitOf(1000)).toBe("pulse-us");
  });
  it("the map as read names the decided throttle unit", () => {
    const map = parseColumnMap("time=T,roll=R,pitch=P,yaw=Y,throttle=H");
    const layout = makeLayout(["T", "R", "P", "Y", "H"], map, 1);
    expect(boundMap(layout, "pulse-us").find((b) => b.header === "H")?.channel).toEqual({
      kind: "throttle",
      unit: "pulse-us",
    });
    expect(boundMap(layout, "pulse-us").slice(0, 4)).toEqual(map.slice(0, 4));
  });
});
