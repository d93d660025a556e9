import "server-only";
import type { LogAnalysis } from "@/lib/analysis/types";
import { MOTOR_POSITIONS } from "@/lib/health/motor-positions";
import type { Baseline } from "@/lib/health/baseline";
import { compareWithBaseline } from "@/lib/health/compare";
import { separateRepairEffects } from "@/lib/health/repair-effects";
import type { Tx } from "./db";
import { baselineFlownAt, repairsBetween } from "./repairs";

/**
 * Scores one analysed log against a baseline and stores the result (replacing an older one).
 * Parts that change the spectrum and were fitted between the baseline's flights and this log
 * explain some of its changes: those are stored as "changed after repair" (no points, after the
 * scored findings), and the airframe stays at watch at best until a post-repair baseline exists.
 */
export async function storeAssessment(
  tx: Tx,
  logId: string,
  analysis: LogAnalysis,
  baselineId: string,
  baseline: Baseline,
) {
  const compared = compareWithBaseline(analysis, baseline, { motorPositions: MOTOR_POSITIONS });
  const log = await tx.flightLog.findUnique({
    where: { id: logId },
    select: { airframeId: true, flownAt: true },
  });
  const repairs = log?.airframeId
    ? await repairsBetween(tx, log.airframeId, await baselineFlownAt(tx, baselineId), log.flownAt)
    : [];
  const a = separateRepairEffects(
    { ...compared, score: Number.isFinite(compared.score) ? compared.score : null },
    repairs,
  );
  const data = {
    score: a.score,
    status: a.status,
    findings: JSON.stringify([...a.findings, ...a.changedAfterRepair]),
    notCompared: JSON.stringify(compared.notCompared),
  };
  return tx.assessment.upsert({
    where: { logId_baselineId: { logId, baselineId } },
    create: { logId, baselineId, ...data },
    update: data,
  });
}
