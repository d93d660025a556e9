import Link from "next/link";
import { ActionForm } from "@/app/_components/action-form";
import { StatusBadge } from "@/app/_components/status-badge";
import type { Status } from "@/lib/health/thresholds";
import { reanalyseAction } from "../../../actions";
import { WHEN } from "@/app/_components/dates";
import { scoreText } from "@/lib/view/score-text";

export interface LogsTableProps {
  airframeId: string;
  canTech: boolean;
  logs: {
    log: {
      id: string;
      flownAt: Date;
      fileName: string;
      sampleRateHz: number | null;
      durationS: number | null;
      status: string;
      error: string | null;
    };
    assessment: { status: Status; score: number | null } | null;
  }[];
}

/** Every log of the airframe with its verdict; techs can re-run an analysis from the stored original. */
export function LogsTable({ airframeId, canTech, logs }: LogsTableProps) {
  return (
    <section className="card space-above">
      <h2>Logs</h2>
      <table data-testid="logs">
        <thead>
          <tr>
            <th>flown</th>
            <th>file</th>
            <th>rate</th>
            <th>status</th>
            <th className="num">score</th>
            <th>
              <span className="visually-hidden">re-run</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {logs.map(({ log, assessment }) => (
            <tr key={log.id}>
              <td className="small">{WHEN.format(log.flownAt)}</td>
              <td>
                <Link href={`/logs/${log.id}`}>{log.fileName}</Link>
              </td>
              <td className="small">
                {log.sampleRateHz
                  ? `${Math.round(log.sampleRateHz)} Hz · ${(log.durationS ?? 0).toFixed(0)} s`
                  : "–"}
              </td>
              <td>
                {log.status === "failed" ? (
                  <span className="field-error">failed: {log.error}</span>
                ) : assessment ? (
                  <StatusBadge status={assessment.status} />
                ) : (
                  log.status
                )}
              </td>
              <td className="num">{scoreText(assessment?.score)}</td>
              <td>
                {canTech && log.status !== "pending" ? (
                  <ActionForm action={reanalyseAction} submitLabel="Re-run analysis" compact>
                    <input type="hidden" name="logId" value={log.id} />
                    <input type="hidden" name="airframeId" value={airframeId} />
                  </ActionForm>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
