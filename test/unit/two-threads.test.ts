/**
 * The CLI's two-thread pipeline (lib/analysis/two-threads.ts): the same analysis as one thread, and
 * a fixed number of buffer sets however many gaps the log has (issue 11 defect 7: a log whose every
 * step after the first rows is a gap took 30 s and 7 GB; it allocated one buffer set per gap).
 */
import { describe, expect, it } from "vitest";
import { analyzeLog, bytesSource } from "@/lib/analysis/analyze-log";
import { analyzeLogInTwoThreads } from "@/lib/analysis/two-threads";

const entryUrl = new URL("../../scripts/cli.ts", import.meta.url);

/** 4,096 rows at 4 kHz, then every step 1 ms (a gap of 4 periods each): `rows` rows in all. */
function manyGaps(rows: number): Uint8Array {
  let s = "time_us,gyro_roll,gyro_pitch,gyro_yaw,throttle,rpm_1,rpm_2,rpm_3,rpm_4\n";
  let t = 0;
  for (let i = 0; i < rows; i++) {
    t += i < 4096 ? 250 : 1000;
    s += `${t},${(Math.sin(i * 0.7) * 20).toFixed(3)},${(Math.cos(i * 1.3) * 15).toFixed(3)},${(Math.sin(i * 0.2) * 5).toFixed(3)},0.45,21000,21010,20990,21005\n`;
  }
  return new TextEncoder().encode(s);
}

describe("two-thread pipeline", () => {
  it(
    "a log of 40,000 rows that is nearly all gaps: same analysis as one thread, at most 7 buffer sets",
    { timeout: 120_000 },
    async () => {
      const bytes = manyGaps(40_000);
      const one = await analyzeLog(bytesSource(bytes, 1 << 20));
      const two = await analyzeLogInTwoThreads(bytesSource(bytes, 1 << 20), { entryUrl });
      expect(two.summary.gapCount).toBe(40_000 - 4096); // rows 4097… each follow a 1 ms step
      expect(two.summary.gaps).toHaveLength(1000); // listed ones; the rest are counted
      expect(two.analysis).toEqual(one.analysis);
      // MAX_IN_FLIGHT (4) batches waiting, plus at most three being filled or sent from one piece.
      expect(two.stats.bufferSets).toBeLessThanOrEqual(7);
      expect(two.stats.maxInFlight).toBeLessThanOrEqual(7);
      // One message per 8,192 rows or per 4,096 gaps, not one per gap.
      expect(two.stats.batches).toBeLessThanOrEqual(
        Math.ceil(40_000 / 8192) + Math.ceil(40_000 / 4096) + 1,
      );
    },
  );
});
