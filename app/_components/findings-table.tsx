import { Caution } from "@/app/_components/caution";
import { StatusBadge } from "@/app/_components/status-badge";
import type { Finding, NotCompared } from "@/lib/health/compare";

export interface FindingsCardProps {
  title: string;
  /** null: the log was not judged (no baseline); the sentence says why. */
  assessment: { findings: (Finding & { repair?: string })[]; notCompared: NotCompared[] } | null;
  notJudged: string;
  fileName?: string;
}

/** A log's findings against its baseline, worst first, with what was not compared and the caution. */
export function FindingsCard({ title, assessment, notJudged, fileName }: FindingsCardProps) {
  return (
    <section className="card space-above">
      <h2>{title}</h2>
      {!assessment ? (
        <p className="muted">{notJudged}</p>
      ) : assessment.findings.length === 0 ? (
        <p>
          No change from the baseline beyond the watch thresholds{fileName ? ` (${fileName})` : ""}.
        </p>
      ) : (
        <table>
          <thead>
            <tr>
              <th>severity</th>
              <th className="num">points</th>
              <th>axis</th>
              <th>what and where to look</th>
            </tr>
          </thead>
          <tbody>
            {assessment.findings.map((f) => (
              <tr key={`${f.kind}-${f.axis}-${f.freqHz}`}>
                <td>
                  {f.repair ? (
                    <span className="tag">after repair</span>
                  ) : (
                    <StatusBadge status={f.severity} />
                  )}
                </td>
                <td className="num">−{Math.round(f.points)}</td>
                <td>{f.axis}</td>
                <td>{f.text}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {assessment && assessment.notCompared.length > 0 ? (
        <p className="muted small">
          Not compared: {assessment.notCompared.map((n) => `${n.what} (${n.reason})`).join("; ")}.
        </p>
      ) : null}
      <Caution compact />
    </section>
  );
}
