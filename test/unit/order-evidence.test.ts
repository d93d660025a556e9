import { describe, expect, it } from "vitest";
import {
  comparableOrder,
  excessSigma,
  heldAgainstOthers,
  standsOut,
  type OrderRange,
  type OrderStanding,
  type RawStanding,
} from "@/lib/health/detectors/order-evidence";
import { robustSigma } from "@/lib/health/detectors/shared";
import { DEFAULT_THRESHOLDS } from "@/lib/health/thresholds";
import { gaussian, mulberry32 } from "@/lib/demo/random";
import { AXES } from "@/lib/logs/columns";

// The yardstick a motor's rise over the other motors is judged by (excessSigma), on generated
// standings: four motors, whole orders 1–4 and their sidebands, three axes, each rise over its own
// baseline drawn from a seeded normal of 1 dB (the healthy wander), expected scatter 1 dB.

const MOTORS = [1, 2, 3, 4];
const ORDERS = [1, 2, 3, 4];

/** Healthy standings, plus `extra(motor, order, side)` dB on every axis. */
function standings(
  seed: number,
  extra: (motor: number, order: number, side: boolean) => number = () => 0,
): OrderStanding[] {
  const rand = mulberry32(seed);
  const g = () => gaussian(rand);
  const raw: RawStanding[] = [];
  for (const motor of MOTORS)
    for (const order of ORDERS)
      for (const side of [false, true])
        for (const axis of AXES)
          raw.push({
            motor,
            order,
            side,
            axis,
            ownDb: g() + extra(motor, order, side),
            sigmaDb: 1,
            rotationHz: 300,
          });
  return heldAgainstOthers(raw);
}

const yardstick = (all: readonly OrderStanding[], motor: number, order: number) => {
  const s = all.find((x) => x.motor === motor && x.order === order && !x.side);
  if (!s) throw new Error("no such standing");
  return excessSigma(all)(s);
};

describe("the yardstick of the rise over the other motors", () => {
  it("does not depend on the judged motor's own standings (leave-one-out)", () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const healthy = standings(seed);
      // Motor 3's 2× 8 dB up: its own yardstick is made of the other three motors only. Exact: the
      // same numbers go through the same arithmetic.
      const bent = standings(seed, (m, o, side) => (m === 3 && o === 2 && !side ? 8 : 0));
      expect(yardstick(bent, 3, 2)).toBe(yardstick(healthy, 3, 2));
      expect(yardstick(bent, 3, 1)).toBe(yardstick(healthy, 3, 1));
      // Robust spreads never fall below 0.5 dB (MIN_ROBUST_SIGMA_DB in detectors/shared.ts).
      expect(yardstick(bent, 3, 2)).toBeGreaterThanOrEqual(0.5);
    }
  });

  it("names a motor whose 2× rose 6 dB on every axis, and no motor of the healthy table", () => {
    const h = DEFAULT_THRESHOLDS;
    for (const seed of [1, 2, 3, 4, 5]) {
      const healthy = standings(seed);
      const sigma = excessSigma(healthy);
      expect(healthy.filter((s) => Number.isFinite(standsOut(s, h, sigma)))).toEqual([]);
      const bent = standings(seed, (m, o, side) => (m === 3 && o === 2 && !side ? 6 : 0));
      const out = bent.filter((s) => Number.isFinite(standsOut(s, h, excessSigma(bent))));
      expect(out.length).toBeGreaterThan(0);
      expect(new Set(out.map((s) => `${s.motor}/${s.order}/${s.side}`))).toEqual(
        new Set(["3/2/false"]),
      );
    }
  });

  it("with fewer than three other motors, takes the rise over the others as it stands", () => {
    const three = standings(7).filter((s) => s.motor !== 4);
    const again = heldAgainstOthers(three);
    const s = again.find((x) => x.motor === 1 && x.order === 1 && !x.side);
    expect(s).toBeDefined();
    if (!s) return;
    // Two other motors: each has one other left, no median, so the rise over the others is
    // taken as it stands: the larger of every standing's spread and the order's over the others.
    const expected = Math.max(
      robustSigma(again.map((x) => x.excessDb)),
      robustSigma(
        again.filter((x) => x.motor !== 1 && x.order === 1 && !x.side).map((x) => x.excessDb),
      ),
    );
    expect(excessSigma(again)(s)).toBe(expected);
  });
});

describe("which orders are compared (folding: sampling theorem, see folding.test.ts)", () => {
  const range = (rates: number[] | undefined, fs = 1000): OrderRange => ({
    sampleRateHz: fs,
    baselineRatesHz: rates,
    minFreqHz: 40,
    maxHz: 0.45 * fs,
  });

  it("inside the common range always; above the log's Nyquist frequency only where it folds, against a baseline of the same rate", () => {
    // 1 kHz log: 1× at 300 Hz is direct (300·1.03 ≤ 450).
    expect(comparableOrder(range([2000, 2000]), 1, 300, 1.03)).toBe(true);
    // 2× at 640 Hz folds to 360 Hz (618–659 Hz fold to 341–382 Hz, inside 40–450 Hz).
    expect(comparableOrder(range([1000, 1000]), 2, 640, 1.03)).toBe(true);
    // … but a baseline logged (partly) at another rate saw it directly, not folded onto another
    // part of the frame's response; and a baseline built before version 4 does not say.
    expect(comparableOrder(range([1000, 2000]), 2, 640, 1.03)).toBe(false);
    expect(comparableOrder(range(undefined), 2, 640, 1.03)).toBe(false);
    // Half orders are never compared folded; nor a range that straddles fs/2 or fs.
    expect(comparableOrder(range([1000]), 2.5, 640, 1.03)).toBe(false);
    expect(comparableOrder(range([1000]), 2, 505, 1.03)).toBe(false);
    expect(comparableOrder(range([1000]), 2, 995, 1.03)).toBe(false);
    // A fold that lands below the lowest analysed frequency (965–985 Hz fold to 15–35 Hz).
    expect(comparableOrder(range([1000]), 2, 975, 1.01)).toBe(false);
  });
});
