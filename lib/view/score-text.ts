/**
 * A score as people read it: whole numbers, one decimal below 10 and two significant digits below
 * 1 (where the scale's tail keeps badly damaged airframes apart; lib/health/thresholds.ts), a
 * dash when there is no score.
 */
export function scoreText(score: number | null | undefined): string {
  if (score === null || score === undefined || !Number.isFinite(score)) return "–";
  if (score >= 10) return String(Math.round(score));
  return score >= 1 ? score.toFixed(1) : score.toPrecision(2);
}
