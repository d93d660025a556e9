import "server-only";
import type { Assessment } from "@/lib/health/compare";
import { separateRepairEffects } from "@/lib/health/repair-effects";
import type { Tx } from "./db";
import { baselineFlownAt, repairsBetween } from "./repairs";

/**
 * Stores the comparison of one analysed log with a baseline (replacing an older one).
 * Parts that change the spectrum and were fitted between the baseline's flights and this log
 * explain some of its changes: those are stored as "changed after repair" (no points, after the
 * scored findings), and the airframe stays at watch at best until a post-repair baseline exists.
 */
export async function storeAssessment(
  tx: Tx,
  logId: string,
  compared: Assessment,
  baselineId: string,
) {
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
