import { describe, expect, it } from "vitest";
import type { LogAnalysis } from "@/lib/analysis/types";
import { InputError } from "@/lib/errors";
import { buildBaseline, recurringPeaks } from "@/lib/health/baseline";
import { syntheticAnalysis, type Bump } from "../support/synthetic-analysis";

// The baseline from 1..N constructed analyses (test/support/synthetic-analysis.ts: generated test
// cases, invented numbers), checked against hand computations of the rules in
// lib/health/baseline.ts: which peaks count as known, which structural peaks make a mode, and
// each band's level and scatter. Sample standard deviation (n − 1) as lib/signal/stats.ts defines
// it; power means are the mean of 10^(dB/10), in dB (common practice for levels).

const MODE: Bump = { axis: "roll", freqHz: 300, heightDb: 15 };

function log(spec: Parameters<typeof syntheticAnalysis>[0] = {}): LogAnalysis {
  return syntheticAnalysis({ bumps: [MODE], ...spec });
}

function band(a: LogAnalysis, index: number) {
  const b = a.throttleBands[index];
  if (!b) throw new Error(`no throttle band ${index}`);
  return b;
}

function peak(freqHz: number) {
  return { freqHz, levelDb: -20, prominenceDb: 10, widthHz: 8, bin: Math.round(freqHz / 2) };
}

/** Index of the analysis band starting at loHz. */
function bandAt(a: LogAnalysis, loHz: number): number {
  return a.bands.findIndex((b) => b.loHz === loHz);
}

describe("per-band level and scatter", () => {
  it("is the mean over the logs, the logs' spread and the pooled segment spread", () => {
    const a = log();
    const b = log({ bandOffset: { axis: "pitch", loHz: 80, db: 2 } });
    const i = bandAt(a, 80);
    for (const t of [2, 3, 4]) band(b, t).axes.pitch.bandSpreadDb[i] = 2;
    const base = buildBaseline([a, b]);
    const levelA = band(a, 3).axes.pitch.bandDb[i] ?? Number.NaN;
    const axis = base.throttleBands.find((x) => x.index === 3)?.axes.pitch;
    // Hand computation: mean(L, L + 2) = L + 1; sample SD of (L, L + 2) = √2;
    // segment spread √((1² + 2²)/2) = √2.5.
    expect(axis?.bandDb[i]).toBeCloseTo(levelA + 1, 10);
    expect(axis?.logSpreadDb[i]).toBeCloseTo(Math.SQRT2, 10);
    expect(axis?.segmentSpreadDb[i]).toBeCloseTo(Math.sqrt(2.5), 10);
    // A band the two logs agree on has no log spread.
    expect(axis?.logSpreadDb[bandAt(a, 40)]).toBe(0);
  });

  it("weights the mean throttle by segments and keeps the smallest log's segment count", () => {
    const a = log();
    const b = log({ flown: { 2: 10, 3: 20, 4: 20 } });
    band(b, 2).meanThrottle = 0.33;
    const t = buildBaseline([a, b]).throttleBands.find((x) => x.index === 2);
    expect(t?.segments).toBe(30);
    expect(t?.segmentsPerLog).toBe(10);
    expect(t?.meanThrottle).toBeCloseTo((20 * 0.3125 + 10 * 0.33) / 30, 12);
    expect(t?.seconds).toBeCloseTo(band(a, 2).seconds + band(b, 2).seconds, 12);
  });

  it("leaves out a log's band with fewer than 8 segments, and bands nobody flew", () => {
    const a = log();
    const b = log({ flown: { 2: 5, 3: 20, 4: 20 } });
    const base = buildBaseline([a, b]);
    expect(base.throttleBands.map((x) => x.index)).toEqual([2, 3, 4]);
    const t = base.throttleBands.find((x) => x.index === 2);
    expect(t?.segments).toBe(20);
    expect(t?.segmentsPerLog).toBe(20);
  });

  it("averages motor orders as power means and counts their measured blocks", () => {
    const a = log();
    const b = log({ orderDb: (m, o) => (m === 1 && o === 1 ? -4 : -10), maskedShare: { 1: 0.25 } });
    const base = buildBaseline([a, b]);
    const m1 = base.throttleBands.find((x) => x.index === 3)?.motors.find((m) => m.motor === 1);
    const o1 = m1?.orders?.find((o) => o.order === 1);
    // 10·log10((10^−1 + 10^−0.4)/2) = −6.04 dB; sample SD of (−10, −4) = √18.
    expect(o1?.db.roll).toBeCloseTo(10 * Math.log10((10 ** -1 + 10 ** -0.4) / 2), 10);
    expect(o1?.logSpreadDb).toBeCloseTo(Math.sqrt(18), 10);
    // 40 blocks per band in each log, 10 of log b's masked.
    expect(o1?.blocks).toBe(40 + 30);
    expect(m1?.order1Db).toEqual(o1?.db);
  });
});

describe("known peaks: the recurrence rule", () => {
  // 2 logs × 3 flown bands = 6 (log, band) spectra: a peak is known when one lies within ±3 % of
  // it in at least half of them (3) and in at least two; its frequency is the median of the
  // first such peak of each spectrum.
  it("a peak in 3 of 6 spectra is known, one in 2 of 6 is not", () => {
    const a = log();
    const b = log();
    band(a, 2).axes.pitch.peaks.push(peak(500));
    band(a, 3).axes.pitch.peaks.push(peak(498), peak(700));
    band(b, 4).axes.pitch.peaks.push(peak(502), peak(704));
    expect(recurringPeaks([a, b], "pitch", 1800)).toEqual([500]);
    // The frame mode is in every band of every log.
    expect(recurringPeaks([a, b], "roll", 1800)).toEqual([300]);
    expect(buildBaseline([a, b]).peaks).toEqual({ roll: [300], pitch: [500], yaw: [] });
  });

  it("peaks above the common range do not count", () => {
    const a = log();
    const b = log();
    for (const x of [a, b]) for (const t of [2, 3, 4]) band(x, t).axes.pitch.peaks.push(peak(950));
    expect(recurringPeaks([a, b], "pitch", 1800)).toEqual([950]);
    expect(recurringPeaks([a, b], "pitch", 900)).toEqual([]);
  });

  it("needs two spectra, so one log with one band knows no peak", () => {
    const one = log({ flown: { 3: 20 } });
    expect(recurringPeaks([one], "roll", 1800)).toEqual([]);
  });

  it("does not count bands with fewer than 8 segments", () => {
    // 5 spectra with enough segments: half of them rounds up to 3.
    const a = log();
    const b = log({ flown: { 2: 5, 3: 20, 4: 20 } });
    band(a, 2).axes.pitch.peaks.push(peak(500));
    band(b, 2).axes.pitch.peaks.push(peak(500));
    band(b, 3).axes.pitch.peaks.push(peak(500));
    expect(recurringPeaks([a, b], "pitch", 1800)).toEqual([]);
    band(b, 4).axes.pitch.peaks.push(peak(500));
    expect(recurringPeaks([a, b], "pitch", 1800)).toEqual([500]);
  });
});

describe("modes", () => {
  it("are structural peaks within 4 % in most logs; frequency the median, spread the range", () => {
    const logs = [
      log(),
      log(),
      log({
        bumps: [
          { ...MODE, freqHz: 303 },
          { axis: "pitch", freqHz: 200, heightDb: 12 },
        ],
      }),
    ];
    const base = buildBaseline(logs);
    // roll: 300, 300, 303 → median 300, range 3 Hz = 1 %; pitch 200 Hz in one log of three
    // (two are needed: ⌈2·3/3⌉) is no mode.
    expect(base.modes).toHaveLength(1);
    const m = base.modes[0];
    expect(m?.axis).toBe("roll");
    expect(m?.freqHz).toBe(300);
    expect(m?.spreadPct).toBe(1);
    expect(m?.seenIn).toBe(3);
    expect(m?.bands?.map((b) => b.index)).toEqual([2, 3, 4]);
  });

  it("a mode in two of three logs is kept", () => {
    const pitch: Bump = { axis: "pitch", freqHz: 200, heightDb: 12 };
    const base = buildBaseline([
      log({ bumps: [MODE, pitch] }),
      log({ bumps: [MODE, pitch] }),
      log(),
    ]);
    expect(base.modes.map((m) => [m.axis, m.freqHz, m.seenIn])).toEqual([
      ["roll", 300, 3],
      ["pitch", 200, 2],
    ]);
  });
});

describe("the whole baseline", () => {
  it("takes the common range, the lowest rate's bands and the motors every log has", () => {
    const base = buildBaseline([log(), log({ sampleRateHz: 2000 })]);
    expect(base.logs).toBe(2);
    expect(base.sampleRateHz).toBe(2000);
    expect(base.maxFreqHz).toBe(900);
    expect(base.bands.every((b) => b.hiHz <= 900)).toBe(true);
    expect(base.motors).toEqual([1, 2, 3, 4]);
  });

  it("lists motors with untrustworthy telemetry and axes without a usable signal", () => {
    const base = buildBaseline([
      log({ maskedShare: { 2: 0.6, 3: 0.5 } }),
      log({ unusable: { yaw: "the signal is flat" } }),
    ]);
    // More than half masked (DEFAULT_THRESHOLDS.maxMaskedShare) in some log: 2 but not 3.
    expect(base.untrustedMotors).toEqual([2]);
    expect(base.unusableAxes).toEqual([{ axis: "yaw", reason: "the signal is flat" }]);
  });

  it("refuses no logs, mixed throttle bands, too little flying and no usable axis", () => {
    expect(() => buildBaseline([])).toThrow(InputError);
    const short = log();
    short.throttleBands = short.throttleBands.slice(0, 4);
    expect(() => buildBaseline([log(), short])).toThrow(/different throttle bands/);
    expect(() => buildBaseline([log({ flown: { 3: 7 } })])).toThrow(/8 analysis segments/);
    expect(() =>
      buildBaseline([log({ unusable: { roll: "flat", pitch: "flat", yaw: "flat" } })]),
    ).toThrow(/no gyro axis/);
  });
});
