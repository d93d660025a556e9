import { describe, expect, it } from "vitest";
import {
  canonicalMap,
  channelFor,
  checkMap,
  formatColumnMap,
  parseColumnMap,
  proposeColumnMap,
  type ColumnMap,
} from "@/lib/logs/columns";

// Channels and units are heatcheck's own log format (README, "Log format" and "Foreign headers").
// The header names below are invented; they have the shapes foreign logs take (common practice in
// flight-log CSVs, from memory): an index in brackets per axis, motors counted from 0, a loop
// counter beside the time column, a stick command that is not a gyro.

describe("a map proposed from header words", () => {
  it("reads indexed axis names, 0-based motor numbers and leaves a loop counter alone", () => {
    const p = proposeColumnMap([
      "tick",
      "elapsed time [us]",
      "body_rate[0]",
      "body_rate[1]",
      "body_rate[2]",
      "pilot_cmd[3]",
      "throttle",
      "esc_0 rpm",
      "esc_1 rpm",
    ]);
    expect(p.missing).toEqual([]);
    const keys = Object.fromEntries(p.map.map((b) => [b.header, b.channel]));
    expect(keys["elapsed time [us]"]).toEqual({ kind: "time", unit: "us" });
    expect(keys["body_rate[0]"]).toEqual({ kind: "gyro", axis: "roll", unit: "deg/s" });
    expect(keys["body_rate[1]"]).toEqual({ kind: "gyro", axis: "pitch", unit: "deg/s" });
    expect(keys["body_rate[2]"]).toEqual({ kind: "gyro", axis: "yaw", unit: "deg/s" });
    expect(keys.throttle).toEqual({ kind: "throttle", unit: "auto" });
    expect(keys["esc_0 rpm"]).toEqual({ kind: "rpm", motor: 1, unit: "rpm" });
    expect(keys["esc_1 rpm"]).toEqual({ kind: "rpm", motor: 2, unit: "rpm" });
    expect(keys.tick).toBeUndefined();
    expect(keys["pilot_cmd[3]"]).toBeUndefined();
    expect(p.guesses).toHaveLength(7); // one sentence per bound column
    expect(p.guesses.filter((g) => g.includes("numbered from 0, shifted to 1"))).toHaveLength(2);
  });

  it("motors numbered from 1 keep their numbers; Hz and rad in the name set the unit", () => {
    const p = proposeColumnMap(["t (s)", "rate x rad", "rate y rad", "rate z rad", "esc3 hz"]);
    const keys = Object.fromEntries(p.map.map((b) => [b.header, b.channel]));
    expect(keys["t (s)"]).toEqual({ kind: "time", unit: "s" });
    expect(keys["rate x rad"]).toEqual({ kind: "gyro", axis: "roll", unit: "rad/s" });
    expect(keys["esc3 hz"]).toEqual({ kind: "rpm", motor: 3, unit: "hz" });
  });

  it("without a time word, takes a column with a time unit whose first values only rise", () => {
    const headers = ["n", "clock us", "roll rate", "pitch rate", "yaw rate"];
    const rising = [
      [0, 100, 1, 2, 3],
      [1, 350, 1, 2, 3],
    ];
    expect(proposeColumnMap(headers, rising).map[0]).toEqual({
      header: "clock us",
      channel: { kind: "time", unit: "us" },
    });
    const falling = [
      [0, 350, 1, 2, 3],
      [1, 100, 1, 2, 3],
    ];
    expect(proposeColumnMap(headers, falling).missing).toEqual(["time"]);
  });

  it("says which required channels no header suggested", () => {
    expect(proposeColumnMap(["a", "b", "c"]).missing).toEqual(["time", "roll", "pitch", "yaw"]);
  });

  it("canonical headers need no guess", () => {
    const p = proposeColumnMap(["time_s", "gyro_roll", "gyro_pitch", "gyro_yaw", "rpm_4"]);
    expect(p.guesses).toEqual([]);
    expect(p.map).toEqual(canonicalMap(["time_s", "gyro_roll", "gyro_pitch", "gyro_yaw", "rpm_4"]));
  });
});

describe("canonical headers", () => {
  it("bind time, the three gyro axes and the optional channels in their documented units", () => {
    const map = canonicalMap([
      "time_us",
      "gyro_roll",
      "gyro_pitch",
      "gyro_yaw",
      "throttle",
      "rpm_2",
      "setpoint_roll",
    ]);
    expect(map?.map((b) => b.channel)).toEqual([
      { kind: "time", unit: "us" },
      { kind: "gyro", axis: "roll", unit: "deg/s" },
      { kind: "gyro", axis: "pitch", unit: "deg/s" },
      { kind: "gyro", axis: "yaw", unit: "deg/s" },
      { kind: "throttle", unit: "fraction" },
      { kind: "rpm", motor: 2, unit: "rpm" },
      { kind: "setpoint", axis: "roll", unit: "deg/s" },
    ]);
  });
  it("are not canonical without a time column or one gyro axis", () => {
    expect(canonicalMap(["gyro_roll", "gyro_pitch", "gyro_yaw"])).toBeUndefined();
    expect(canonicalMap(["time_us", "gyro_roll", "gyro_pitch"])).toBeUndefined();
  });
});

describe("map text", () => {
  it("is read with units and written back in the same syntax", () => {
    const text =
      "time=Clock (ms)|ms,roll=RateA|rad/s,pitch=RateB|rad/s,yaw=RateC|rad/s,throttle=Stick|pulse-us,rpm1=Spin 1|hz";
    const map = parseColumnMap(text);
    expect(map[0]).toEqual({ header: "Clock (ms)", channel: { kind: "time", unit: "ms" } });
    expect(map[5]).toEqual({ header: "Spin 1", channel: { kind: "rpm", motor: 1, unit: "hz" } });
    expect(formatColumnMap(map)).toBe(text);
    expect(parseColumnMap(formatColumnMap(map))).toEqual(map);
  });
  it("takes default units: µs for time, deg/s for rates, auto for throttle, rpm for motors", () => {
    expect(
      parseColumnMap("time=T,roll=R,pitch=P,yaw=Y,throttle=H,rpm_8=M").map((b) => b.channel),
    ).toEqual([
      { kind: "time", unit: "us" },
      { kind: "gyro", axis: "roll", unit: "deg/s" },
      { kind: "gyro", axis: "pitch", unit: "deg/s" },
      { kind: "gyro", axis: "yaw", unit: "deg/s" },
      { kind: "throttle", unit: "auto" },
      { kind: "rpm", motor: 8, unit: "rpm" },
    ]);
    expect(channelFor("time", "µs")).toEqual({ kind: "time", unit: "us" });
  });
  it("is rejected with a message naming the entry", () => {
    expect(() => parseColumnMap("time=T|minutes,roll=R,pitch=P,yaw=Y")).toThrow(
      /unit "minutes" is not known for time/,
    );
    expect(() => parseColumnMap("roll=R,pitch=P,yaw=Y")).toThrow(/needs a column for time/);
    expect(() => parseColumnMap("time=T,roll=R,pitch=P,yaw=Y,roll=Q")).toThrow(/binds roll twice/);
    expect(() => parseColumnMap("time=T,roll=R,pitch=R,yaw=Y")).toThrow(
      /binds the column "R" twice \(to roll and to pitch\)/,
    );
    expect(() => parseColumnMap("speed=S")).toThrow(/"speed" is not a channel/);
    expect(() => parseColumnMap("time=T,roll=R,pitch=P,yaw=Y,rpm10=M")).toThrow(
      /"rpm10" is not a channel/,
    );
    expect(() => parseColumnMap("time=T,roll=R,pitch=P,yaw=Y,rpm0=M")).toThrow(
      /motors are numbered 1 to 8, got rpm0/,
    );
    expect(() => parseColumnMap("time,roll=R")).toThrow(/must look like key=Header/);
    expect(() => parseColumnMap("time=|us,roll=R")).toThrow(/names no header/);
  });
  it("a map object that binds one column to two keys is rejected the same way", () => {
    const map: ColumnMap = [
      { header: "time_us", channel: { kind: "time", unit: "us" } },
      { header: "gyro_roll", channel: { kind: "gyro", axis: "roll", unit: "deg/s" } },
      { header: "gyro_roll", channel: { kind: "gyro", axis: "pitch", unit: "deg/s" } },
      { header: "gyro_yaw", channel: { kind: "gyro", axis: "yaw", unit: "deg/s" } },
    ];
    expect(() => checkMap(map)).toThrow(
      /the map binds the column "gyro_roll" twice \(to roll and to pitch\)/,
    );
  });
});
