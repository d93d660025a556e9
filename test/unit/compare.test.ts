import { describe, expect, it } from "vitest";
import { buildBaseline, type Baseline } from "@/lib/health/baseline";
import { compareWithBaseline, type Assessment, type Finding } from "@/lib/health/compare";
import { floorOver } from "@/lib/health/detectors/floor-rise";
import { MOTOR_POSITIONS } from "@/lib/health/motor-positions";
import { DEFAULT_THRESHOLDS, penaltyFor } from "@/lib/health/thresholds";
import {
  rotationHz,
  syntheticAnalysis,
  type Bump,
  type SyntheticSpec,
} from "../support/synthetic-analysis";

// Each detector of lib/health/detectors on a small constructed baseline and log
// (test/support/synthetic-analysis.ts: flat spectra with Gaussian bumps, generated test cases).
// The baseline is two identical healthy logs with one frame mode, roll at 300 Hz; each test
// changes one thing in the log and checks that exactly that detector answers, with the size of
// the change. Expected points come from the piecewise-linear penalty of lib/health/thresholds.ts.

const MODE: Bump = { axis: "roll", freqHz: 300, heightDb: 15 };
const baseline: Baseline = buildBaseline([
  syntheticAnalysis({ bumps: [MODE] }),
  syntheticAnalysis({ bumps: [MODE] }),
]);

function assess(spec: SyntheticSpec, positions?: Record<number, string>): Assessment {
  return compareWithBaseline(syntheticAnalysis({ bumps: [MODE], ...spec }), baseline, {
    motorPositions: positions,
  });
}

function only(a: Assessment): Finding {
  expect(a.findings, JSON.stringify(a.findings)).toHaveLength(1);
  const f = a.findings[0];
  if (!f) throw new Error("no finding");
  return f;
}

const h = DEFAULT_THRESHOLDS;

describe("an unchanged log", () => {
  it("has no finding, scores 100, is ok and compares every flown band", () => {
    const a = assess({});
    expect(a.findings).toEqual([]);
    expect(a.score).toBe(100);
    expect(a.status).toBe("ok");
    expect(a.notCompared).toEqual([]);
    expect(a.comparedBands).toEqual(["25–38 %", "38–50 %", "50–63 %"]);
  });
});

describe("mode shift and mode lost", () => {
  // The mode's bins are 2 Hz apart: a peak refined by the quadratic vertex is within a quarter bin
  // (0.5 Hz, 0.2 % at 285 Hz) for a symmetric bump; 0.3 percentage points is the stated tolerance.
  it.each([4, 5, 8, 12])("a mode moved down by %i %% is reported as that drop", (x) => {
    const f = only(assess({ bumps: [{ ...MODE, freqHz: 300 * (1 - x / 100) }] }));
    expect(f.kind).toBe("mode-shift");
    expect(f.axis).toBe("roll");
    expect(f.baselineFreqHz).toBe(300);
    expect(Math.abs((f.shiftPct ?? 0) + x)).toBeLessThan(0.3);
    expect(Math.abs(f.freqHz - 300 * (1 - x / 100))).toBeLessThan(1);
    // Graded on the drop itself (the baseline's own spread is 0 here).
    expect(f.points).toBeCloseTo(penaltyFor(-(f.shiftPct ?? 0), h.modeShiftPct), 1);
    // f ∝ √(k/m): a drop of x % is 1 − (1 − x)² less stiffness.
    const loss = (1 - (1 - x / 100) ** 2) * 100;
    expect(f.text).toContain(`about ${loss.toFixed(0)} % less stiffness`);
  });

  it("a mode that rose counts half and is never more than watch", () => {
    // +6 % counts as 3 %: exactly the watch step, 10 points.
    const f = only(assess({ bumps: [{ ...MODE, freqHz: 318 }] }));
    expect(f.kind).toBe("mode-shift");
    expect(f.shiftPct).toBeCloseTo(6, 1);
    expect(f.severity).toBe("watch");
    expect(f.points).toBe(h.penalty.watch);
    const big = only(assess({ bumps: [{ ...MODE, freqHz: 336 }] }));
    expect(big.severity).toBe("watch");
    expect(big.points).toBeLessThanOrEqual(h.penalty.watch);
  });

  it("a mode that every baseline log had and the log does not show is lost, at the inspect step", () => {
    const a = assess({ bumps: [] });
    const f = only(a);
    expect(f.kind).toBe("mode-lost");
    expect(f.freqHz).toBe(300);
    expect(f.severity).toBe("inspect");
    expect(f.points).toBe(h.penalty.inspect);
    // The search window of the sentence: −30 % to +15 %.
    expect(f.text).toContain("no peak from 210 to 345 Hz");
    expect(a.score).toBe(100 - h.penalty.inspect);
  });

  it("a mode expected in only one compared band is not called lost", () => {
    const a = assess({ bumps: [], flown: { 2: 20 } });
    expect(a.findings).toEqual([]);
  });
});

describe("band rise", () => {
  it("an analysis band 8 dB up at matched throttle is reported on its axis with 8 dB", () => {
    const f = only(assess({ bandOffset: { axis: "pitch", loHz: 80, db: 8 } }));
    expect(f.kind).toBe("band-rise");
    expect(f.axis).toBe("pitch");
    // Centre of 80–120 Hz on a log scale: √(80·120) = 98 Hz.
    expect(f.freqHz).toBe(98);
    expect(f.deltaDb).toBeCloseTo(8, 6);
    expect(f.points).toBeCloseTo(penaltyFor(8, h.levelDb), 1);
  });

  it("a rise below the watch step is no finding", () => {
    expect(assess({ bandOffset: { axis: "pitch", loHz: 80, db: 2.5 } }).findings).toEqual([]);
  });
});

describe("floor rise", () => {
  it("broadband noise 8 dB up above the corner is one floor rise, not band rises", () => {
    const f = only(assess({ riseAbove: { freqHz: 600, db: 8 } }));
    expect(f.kind).toBe("floor-rise");
    expect(f.deltaDb).toBeCloseTo(8, 6);
    // Centre of the floor's range, the octave from the corner (600 to 1200 Hz): √(600·1200).
    expect(f.freqHz).toBe(Math.round(Math.sqrt(600 * 1200)));
    expect(f.text).toContain("from 600 to 1200 Hz is up 8 dB on roll (also pitch and yaw)");
    expect(f.text).toContain("worn motor bearings or damaged props");
    expect(f.motor).toBeUndefined();
  });

  it("with two modes dropped at the same time it points at the frame screws, not the bearings", () => {
    // Loose frame screws lower and damp every mode (common practice: a soft frame rings lower and
    // longer), and damped modes spread their vibration over the octave above them.
    const PITCH: Bump = { axis: "pitch", freqHz: 200, heightDb: 15 };
    const two = buildBaseline([
      syntheticAnalysis({ bumps: [MODE, PITCH] }),
      syntheticAnalysis({ bumps: [MODE, PITCH] }),
    ]);
    const log = syntheticAnalysis({
      bumps: [
        { ...MODE, freqHz: 270 },
        { ...PITCH, freqHz: 180 },
      ],
      riseAbove: { freqHz: 600, db: 8 },
    });
    const a = compareWithBaseline(log, two);
    expect(a.findings.filter((f) => f.kind === "mode-shift")).toHaveLength(2);
    const floor = a.findings.find((f) => f.kind === "floor-rise");
    expect(floor?.cause).toBe("frame");
    expect(floor?.text).toContain("with 2 frame modes lower at the same time");
    expect(floor?.text).toContain("check every frame screw");
  });

  it("a floor up 12 dB in one compared band and not in the others is no floor rise", () => {
    // Hard flying lifts the floor where the wash or the manoeuvres were, not at every throttle.
    const log = syntheticAnalysis({ bumps: [MODE] });
    const hot = syntheticAnalysis({ bumps: [MODE], riseAbove: { freqHz: 600, db: 12 } });
    const band = hot.throttleBands[3];
    if (!band) throw new Error("no band 3");
    log.throttleBands[3] = band;
    const a = compareWithBaseline(log, baseline);
    expect(a.findings.filter((f) => f.kind === "floor-rise")).toEqual([]);
  });
});

describe("what the detectors run before explains", () => {
  const high: Bump = { axis: "pitch", freqHz: 700, heightDb: 12, structural: false };

  it("a floor rise takes the new peaks above its corner", () => {
    // Control: the same peak without the floor rise is new.
    expect(only(assess({ bumps: [MODE, high] })).kind).toBe("new-peak");
    const f = only(assess({ bumps: [MODE, high], riseAbove: { freqHz: 600, db: 8 } }));
    expect(f.kind).toBe("floor-rise");
  });

  it("a floor rise with one motor's tones between its orders names that motor's bearing", () => {
    const f = only(
      assess({
        orderDb: (m, o) => (m === 4 && (o === 2.5 || o === 3.5) ? 0 : -10),
        riseAbove: { freqHz: 600, db: 8 },
      }),
    );
    expect(f.kind).toBe("floor-rise");
    expect(f.motor).toBe(4);
    expect(f.order).toBe(2.5);
    expect(f.text).toContain("typical of a worn bearing in that motor");
  });
});

describe("new resonance", () => {
  it("a 12 dB peak where the baseline has none is a new peak of 12 dB at its frequency", () => {
    const f = only(
      assess({ bumps: [MODE, { axis: "pitch", freqHz: 90, heightDb: 12, structural: false }] }),
    );
    expect(f.kind).toBe("new-peak");
    expect(f.axis).toBe("pitch");
    expect(f.freqHz).toBe(90);
    expect(f.deltaDb).toBeCloseTo(12, 1);
    expect(f.severity).toBe("ground");
  });

  it("a broad rise (prop wash: a hump 80 Hz wide, 10 dB up) is no new peak: it gains no prominence", () => {
    const a = assess({
      bumps: [MODE, { axis: "pitch", freqHz: 100, heightDb: 10, widthHz: 40, structural: false }],
    });
    expect(a.findings.filter((f) => f.kind === "new-peak")).toEqual([]);
  });

  it("a mode lowered 15 % and broadened is that mode's shift, never a new peak", () => {
    // The roll mode's peak at 300 Hz is gone and a broader one stands at 255 Hz (−15 %).
    const a = assess({ bumps: [{ ...MODE, freqHz: 255, widthHz: 6 }] });
    expect(a.findings.filter((f) => f.kind === "new-peak")).toEqual([]);
    const f = a.findings.find((x) => x.kind === "mode-shift");
    expect(f?.baselineFreqHz).toBe(300);
    expect(Math.abs((f?.shiftPct ?? 0) + 15)).toBeLessThan(0.5);
  });

  it("a mode lowered 15 % is reported as that drop, not as a much weaker bump left near its old place", () => {
    // A bump 8 dB below the mode's level at 296 Hz (−1.3 %) is close, but a mode that stayed would
    // keep about its level; the peak at 255 Hz that stands as high as the mode did is the mode.
    // A behaviour check: on these clean spectra the new-peak search's "mode that left its place"
    // reports the same drop even without the tracking's level term (mode-shift.ts,
    // PAIRING_COST), so this passes with or without it; that term's evidence is the validation
    // matrix (cracks at severity 3 not fully right 8 → 4 of 12).
    const a = assess({
      bumps: [
        { ...MODE, freqHz: 255, widthHz: 6 },
        { axis: "roll", freqHz: 296, heightDb: 7 },
      ],
    });
    const f = a.findings.find((x) => x.kind === "mode-shift");
    expect(f?.baselineFreqHz).toBe(300);
    expect(Math.abs((f?.shiftPct ?? 0) + 15)).toBeLessThan(0.5);
  });

  it("a mode the tracking followed only part of the way down is reported at the peak below, where it went", () => {
    // The mode (15 dB at 300 Hz) is now a broad peak at 255 Hz (−15 %); a 12 dB bump at 285 Hz
    // wins the tracking's pairing (closer, and nearly as high), which alone would read −5 %. The
    // peak below, where the mode left its place, is the same mode further down: one finding,
    // the deeper drop, and no new peak.
    const a = assess({
      bumps: [
        { ...MODE, freqHz: 255, widthHz: 6 },
        { axis: "roll", freqHz: 285, heightDb: 12 },
      ],
    });
    const shifts = a.findings.filter((x) => x.kind === "mode-shift");
    expect(shifts).toHaveLength(1);
    expect(shifts[0]?.baselineFreqHz).toBe(300);
    expect(Math.abs((shifts[0]?.shiftPct ?? 0) + 15)).toBeLessThan(0.5);
    expect(a.findings.filter((x) => x.kind === "new-peak")).toEqual([]);
  });

  it("a new tone is named on the axis it adds most power to, even where it is no local peak", () => {
    // Pitch shows the tone as a narrow peak 6 dB high; roll, at the same frequency, rises 14 dB
    // in a bump too broad to stand above its own local background (as a tone on a frame mode's
    // skirt does). The part rocks most in roll, so roll is where it is named.
    const a = assess({
      bumps: [
        MODE,
        { axis: "pitch", freqHz: 250, heightDb: 6 },
        { axis: "roll", freqHz: 250, heightDb: 14, widthHz: 30 },
      ],
    });
    const peaks = a.findings.filter((f) => f.kind === "new-peak");
    expect(peaks.map((f) => f.axis)).toEqual(["roll"]);
    expect(Math.abs((peaks[0]?.freqHz ?? 0) - 250)).toBeLessThan(2);
  });

  it("a peak at a known baseline peak of another axis is not new", () => {
    const a = assess({ bumps: [MODE, { axis: "yaw", freqHz: 300, heightDb: 12 }] });
    expect(a.findings.filter((f) => f.kind === "new-peak")).toEqual([]);
  });
});

describe("motor orders", () => {
  const bent = (motor: number, order: number) => (motor === 3 && order === 1 ? 0 : -10);

  it("one motor's 1× 10 dB up against its baseline and the other motors names that motor", () => {
    const f = only(assess({ orderDb: bent }));
    expect(f.kind).toBe("motor-order");
    expect(f.motor).toBe(3);
    expect(f.order).toBe(1);
    expect(f.orders).toEqual([1]);
    expect(f.cause).toBe("prop");
    expect(f.deltaDb).toBeCloseTo(10, 6);
    // Its rotation rate, segment-weighted over the compared bands (equal segments here).
    const mean = (rotationHz(2, 3) + rotationHz(3, 3) + rotationHz(4, 3)) / 3;
    expect(f.freqHz).toBeCloseTo(mean, 1);
    expect(f.text.startsWith("motor 3 vibrates 10 dB more")).toBe(true);
  });

  it("with a tone between its orders too, it is a loose motor, not a prop", () => {
    const f = only(assess({ orderDb: (m, o) => (m === 2 && (o === 1 || o === 1.5) ? 0 : -10) }));
    expect(f.motor).toBe(2);
    expect(f.cause).toBe("motor-mount");
    expect(f.text).toContain("1.5×) as a loose part rattles");
  });

  it("a named motor whose exact 1.5× rose 6 dB, leaking 4 dB into the others' 1.5×, is a loose motor", () => {
    // The 1.5× beats the other motors by 2 dB only, under the 3 dB watch step (it is no finding
    // of its own), but with the motor named by its 1× it tells a rattle from a prop.
    const f = only(
      assess({
        orderDb: (m, o) => (m === 2 && o === 1 ? 0 : o === 1.5 ? (m === 2 ? -4 : -6) : -10),
      }),
    );
    expect(f.motor).toBe(2);
    expect(f.cause).toBe("motor-mount");
    expect(f.text).toContain("1.5×) as a loose part rattles");
  });

  it("a half order up by the same amount on every motor does not make the named motor's prop a rattle", () => {
    const f = only(assess({ orderDb: (m, o) => (m === 2 && o === 1 ? 0 : o === 1.5 ? -4 : -10) }));
    expect(f.motor).toBe(2);
    expect(f.cause).toBe("prop");
  });

  it("orders measured another way (an analysis before version 3) are not compared, and the log says so", () => {
    // Before version 3 the orders were measured on the unfiltered gyro and read tens of dB higher
    // (lib/analysis/types.ts, orderGeneration): a bent prop against such a baseline is no finding,
    // nor a false one, until the baseline's logs are analysed again.
    const old = buildBaseline([
      { ...syntheticAnalysis({ bumps: [MODE] }), version: 2 },
      { ...syntheticAnalysis({ bumps: [MODE] }), version: 2 },
    ]);
    expect(old.orderGeneration).toBe(1);
    const a = compareWithBaseline(syntheticAnalysis({ bumps: [MODE], orderDb: bent }), old);
    expect(a.findings).toEqual([]);
    expect(a.notCompared.map((n) => n.what)).toEqual(["motor orders"]);
    expect(a.notCompared[0]?.reason).toContain("analyse them again");
    // A baseline of mixed logs cannot pool its orders either.
    const mixed = buildBaseline([
      { ...syntheticAnalysis({ bumps: [MODE] }), version: 2 },
      syntheticAnalysis({ bumps: [MODE] }),
    ]);
    expect(mixed.orderGeneration).toBe(0);
    const b = compareWithBaseline(syntheticAnalysis({ bumps: [MODE], orderDb: bent }), mixed);
    expect(b.findings).toEqual([]);
    expect(b.notCompared.map((n) => n.what)).toEqual(["motor orders"]);
    // The same log against a baseline of its own generation names the motor (the first test).
    expect(baseline.orderGeneration).toBe(2);
  });

  it("names the motor's position when positions are given", () => {
    const f = only(assess({ orderDb: bent }, MOTOR_POSITIONS));
    expect(f.text.startsWith("motor 3 (rear-right) vibrates")).toBe(true);
  });

  it("every motor up by the same amount is no motor's fault", () => {
    const a = assess({ orderDb: (_m, order) => (order === 1 ? 0 : -10) });
    expect(a.findings.filter((f) => f.kind === "motor-order")).toEqual([]);
  });
});

describe("what is not compared, and why", () => {
  it("an axis without a usable signal in the log", () => {
    const a = assess({ unusable: { yaw: "the signal is flat" } });
    expect(a.notCompared).toEqual([
      { what: "yaw axis", reason: "not usable in this log: the signal is flat" },
    ]);
  });

  it("frequencies above what a slower log can show", () => {
    const a = assess({ sampleRateHz: 2000 });
    expect(a.notCompared).toEqual([
      {
        what: "above 900 Hz",
        reason: "this log was recorded at 2000 Hz and cannot show higher frequencies",
      },
    ]);
    expect(a.findings).toEqual([]);
  });

  it("a throttle band with too little flying in the log", () => {
    const a = assess({ flown: { 2: 20, 3: 20, 4: 4 } });
    expect(a.notCompared).toEqual([{ what: "throttle 50–63 %", reason: "only 1.0 s in this log" }]);
    expect(a.comparedBands).toEqual(["25–38 %", "38–50 %"]);
  });

  it("a motor whose rpm telemetry was masked in most of the log", () => {
    const a = assess({ maskedShare: { 2: 0.8 }, orderDb: (m) => (m === 2 ? 5 : -10) });
    expect(a.notCompared).toEqual([
      {
        what: "motor 2 orders",
        reason: "its rpm telemetry could not be believed in 80 % of the log (reads 0)",
      },
    ]);
    // Its orders, however high, are not held against it.
    expect(a.findings.filter((f) => f.kind === "motor-order")).toEqual([]);
  });

  it("a log with no usable axis has no score and is never ok", () => {
    const a = assess({ unusable: { roll: "flat", pitch: "flat", yaw: "flat" } });
    expect(a.score).toBeNaN();
    expect(a.status).toBe("watch");
    expect(a.notCompared.at(-1)?.what).toBe("whole log");
  });
});

describe("half orders against a baseline of analyses stored before they were measured exactly", () => {
  // Such analyses hold the strongest tone near a half order as its level (here −5 dB, above the
  // exact −10 dB) and nothing beside it; a new log holds that tone beside the half order. Like is
  // held against like: the tone beside, never the exact level, against the old level.
  const old = buildBaseline(
    [1, 2].map(() =>
      syntheticAnalysis({
        bumps: [MODE],
        oldHalfOrders: true,
        sideDb: (_m, o) => (Number.isInteger(o) ? -20 : -5),
      }),
    ),
  );
  const against = (spec: SyntheticSpec) =>
    compareWithBaseline(syntheticAnalysis({ bumps: [MODE], ...spec }), old);
  const healthyTone = (_m: number, o: number) => (Number.isInteger(o) ? -20 : -5);

  it("a healthy new log raises no finding, though its exact half orders read 5 dB under the old level", () => {
    expect(against({ sideDb: healthyTone }).findings).toEqual([]);
  });

  it("a motor's 1× up 10 dB is still named; the rattle itself waits for a new baseline", () => {
    const f = only(
      against({
        orderDb: (m, o) => (m === 2 && o === 1 ? 0 : -10),
        sideDb: (m, o) => (m === 2 && o === 1.5 ? 5 : healthyTone(m, o)),
      }),
    );
    expect(f.motor).toBe(2);
    expect(f.order).toBe(1);
    // A rattle is told by an exact half order, which an old baseline does not have.
    expect(f.cause).toBe("prop");
  });

  it("an exact half order is not held against the old level: no rattle is read from it", () => {
    // Motor 2's 1× and its exact 1.5× are up, the tone beside 1.5× is not. Against the old level
    // (the strongest tone, −5 dB) the exact 1.5× would read 15 dB up, a rattle that the like
    // value, the tone beside it, does not show.
    const f = only(
      against({
        orderDb: (m, o) => (m === 2 && (o === 1 || o === 1.5) ? 0 : -10),
        sideDb: healthyTone,
      }),
    );
    expect(f.motor).toBe(2);
    expect(f.cause).toBe("prop");
  });
});

describe("motor orders at matched rpm (analyses with rpm maps)", () => {
  // The frame answers a 1× near 300 Hz 15 dB louder (a resonance the order passes over). Every
  // baseline motor flew from 240 to 360 Hz; in the log one motor spends its time near 300 Hz.
  // Held at matched throttle, that motor's 1× would read up to 15 dB high; at matched rpm it is
  // compared bin by bin with its own baseline at the same speed, and nothing has changed.
  const response = (order: number, hz: number) =>
    order === 1 ? 15 * Math.exp(-(((hz - 300) / 10) ** 2) / 2) : 0;
  const wide = () => Array.from({ length: 13 }, (_, i) => 240 + 10 * i);
  const rpmBaseline = buildBaseline(
    [1, 2].map(() =>
      syntheticAnalysis({
        bumps: [MODE],
        rpmMap: { flownHz: wide, orderDb: (_m, o, hz) => -10 + response(o, hz) },
      }),
    ),
  );
  const rpmAssess = (
    flownHz: (motor: number) => number[],
    orderDb: (motor: number, order: number, hz: number) => number,
  ) =>
    compareWithBaseline(
      syntheticAnalysis({ bumps: [MODE], rpmMap: { flownHz, orderDb } }),
      rpmBaseline,
    );

  it("the baseline pools each motor's rpm bins", () => {
    expect(rpmBaseline.rpmMaps?.map((m) => m.motor)).toEqual([1, 2, 3, 4]);
    const bins = rpmBaseline.rpmMaps?.[0]?.bins ?? [];
    expect(bins).toHaveLength(13);
    // Two logs of 10 blocks each in every bin.
    expect(bins.every((b) => b.blocks === 20)).toBe(true);
  });

  it("a motor that flew where the frame answers loudest is not blamed for the frame", () => {
    const a = rpmAssess(
      (m) => (m === 2 ? [280, 290, 300, 310, 320] : wide()),
      (_m, o, hz) => -10 + response(o, hz),
    );
    expect(a.findings.filter((f) => f.kind === "motor-order")).toEqual([]);
  });

  it("one motor's 2× 10 dB up at every rpm names that motor, its 2× and the full rise", () => {
    const f = only(
      rpmAssess(wide, (m, o, hz) => -10 + response(o, hz) + (m === 3 && o === 2 ? 10 : 0)),
    );
    expect(f.kind).toBe("motor-order");
    expect(f.motor).toBe(3);
    expect(f.order).toBe(2);
    expect(f.cause).toBe("prop");
    // Levels are kept to 0.001 dB; every bin rose by exactly 10 dB.
    expect(Math.abs((f.deltaDb ?? 0) - 10)).toBeLessThan(0.01);
    // Its rotation rate, weighted by the log's blocks per bin (equal here): the middle of 240–360 Hz.
    expect(f.freqHz).toBeCloseTo(300, 0);
  });
});

describe("the floor is read between the motor orders", () => {
  it("tones sweeping over more than half of the floor's range leave its median where the noise is", () => {
    // 600–1200 Hz at 2 Hz bins, noise at −30 dB; four orders' spans (±35 Hz each around 660,
    // 760, 860, 960 Hz, 280 of 600 Hz) and a fifth (±30 Hz at 1100) hold tones 20 dB up: 340 Hz,
    // more than half the bins, so a plain median would read the tones. Between them the median is
    // the noise's, exactly (the same numbers).
    const binHz = 2;
    const spans = [660, 760, 860, 960, 1100].map((atHz, i) => ({
      atHz,
      halfWidthHz: i < 4 ? 35 : 30,
    }));
    const psd = Array.from({ length: 700 }, (_, k) =>
      spans.some((s) => Math.abs(k * binHz - s.atHz) <= s.halfWidthHz) ? -10 : -30,
    );
    expect(floorOver(psd, binHz, 600, 1200, [])).toBe(-10);
    expect(floorOver(psd, binHz, 600, 1200, spans)).toBe(-30);
    // Spans over more than two thirds of the range leave too little between them: every bin.
    const wide = [{ atHz: 900, halfWidthHz: 220 }];
    expect(floorOver(psd, binHz, 600, 1200, wide)).toBe(-10);
  });
});
