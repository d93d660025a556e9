import "server-only";
import type { LogAnalysis } from "@/lib/analysis/types";
import { MOTOR_POSITIONS } from "@/lib/health/motor-positions";
import type { Baseline } from "@/lib/health/baseline";
import { compareWithBaseline } from "@/lib/health/compare";
import type { Tx } from "./db";

/** Scores one analysed log against a baseline and stores the result (replacing an older one). */
export async function storeAssessment(tx: Tx, logId: string, analysis: LogAnalysis, baselineId: string, baseline: Baseline) {
  const a = compareWithBaseline(analysis, baseline, { motorPositions: MOTOR_POSITIONS });
  const data = {
    score: Number.isFinite(a.score) ? a.score : null,
    status: a.status,
    findings: JSON.stringify(a.findings),
    notCompared: JSON.stringify(a.notCompared),
  };
  return tx.assessment.upsert({
    where: { logId_baselineId: { logId, baselineId } },
    create: { logId, baselineId, ...data },
    update: data,
  });
}
