/**
 * A score as people read it: whole numbers, one decimal below 10 (where the scale's tail keeps
 * badly damaged airframes apart; lib/health/thresholds.ts), a dash when there is no score.
 */
export function scoreText(score: number | null | undefined): string {
  if (score === null || score === undefined || !Number.isFinite(score)) return "–";
  return score >= 10 ? String(Math.round(score)) : score.toFixed(1);
}
