/**
 * Bounded fuzz run of the reader (2,000 seeded mutations; `npm run fuzz` runs 100,000): every
 * mutated log gives a result or a domain error with a sentence, the same in other chunk sizes.
 * The per-test timeout is the hang check: 2,000 runs take about 10–20 s on the 2-core machine.
 */
import { describe, expect, it } from "vitest";
import { fuzzReader } from "./fuzz";

describe("reader fuzz", () => {
  it(
    "2,000 mutations: no unexpected exception, no chunk-dependent outcome, no hang",
    { timeout: 180_000 },
    async () => {
      const r = await fuzzReader(2000, 7);
      expect(r.runs).toBe(2000);
      expect(r.failures).toEqual([]);
      // Both outcomes occur, so the mutations neither always break nor never touch the files.
      expect(r.accepted).toBeGreaterThan(50);
      expect(r.rejected).toBeGreaterThan(500);
      // No single small file (≤ 200 KB) may take long: 5 s is ~100× the usual time.
      expect(r.slowestMs).toBeLessThan(5000);
    },
  );
});
