import Link from "next/link";
import { WHEN } from "@/app/_components/dates";
import { StatusBadge } from "@/app/_components/status-badge";
import type { AirframeView } from "@/lib/server/airframe-view";
import { scoreText } from "@/lib/view/score-text";

// The airframe screen's cards (server components). Each takes the part of the view it shows.

export interface AirframeHeaderProps {
  view: AirframeView;
}

/** Name, design, serial and state; the history downloads; the latest score and the baseline. */
export function AirframeHeader({ view }: AirframeHeaderProps) {
  const { airframe, latest, baseline } = view;
  const status = latest?.assessment?.status ?? "ok";
  return (
    <div className="row align-center">
      <div>
        <h1 className="page-title">{airframe.name}</h1>
        <div className="muted">
          {airframe.frameDesign}
          {airframe.serial ? ` · serial ${airframe.serial}` : ""} ·{" "}
          {airframe.state === "grounded" ? "GROUNDED" : "ready"}
          {airframe.retired ? " · retired" : ""}
        </div>
        <div className="small">
          History:{" "}
          <a href={`/api/v1/airframes/${encodeURIComponent(airframe.name)}/history?format=csv`}>
            CSV
          </a>{" "}
          ·{" "}
          <a href={`/api/v1/airframes/${encodeURIComponent(airframe.name)}/history?format=json`}>
            JSON
          </a>
        </div>
      </div>
      <div className="verdict">
        {latest?.assessment ? (
          <StatusBadge status={status} />
        ) : (
          <span className="muted">no score yet</span>
        )}
        <div className="big-score" data-testid="airframe-score">
          {scoreText(latest?.assessment?.score)}
          <span className="muted small"> / 100</span>
        </div>
        <div className="muted small">
          {baseline
            ? `baseline of ${WHEN.format(baseline.createdAt)} · ${view.flightsSinceBaseline ?? 0} flight(s) since`
            : "no baseline yet"}
        </div>
      </div>
    </div>
  );
}

export interface InstalledPartsCardProps {
  parts: AirframeView["parts"];
}

/** The parts on the airframe now, by position, with life used. */
export function InstalledPartsCard({ parts }: InstalledPartsCardProps) {
  return (
    <section className="card">
      <h2>Installed parts</h2>
      <table data-testid="installed-parts">
        <thead>
          <tr>
            <th>position</th>
            <th>part</th>
            <th>since</th>
            <th className="num">life used</th>
          </tr>
        </thead>
        <tbody>
          {parts.map((p) => (
            <tr key={p.id}>
              <td>{p.position}</td>
              <td>
                <Link href={`/parts?part=${p.partId}`}>
                  {p.part.kind} · {p.part.model}
                </Link>{" "}
                <span className="muted small">{p.part.label}</span>
              </td>
              <td className="small">{WHEN.format(p.fromAt)}</td>
              <td className="num">
                {p.life.flights} flt · {p.life.minutes.toFixed(0)} min
                {p.life.fraction !== null ? (
                  <strong className={p.life.fraction >= 1 ? "worn-out" : undefined}>
                    {" "}
                    · {Math.round(p.life.fraction * 100)} %
                  </strong>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

export interface HistoryCardProps {
  timeline: AirframeView["timeline"];
}

/** Crashes, swaps, logs, baselines and inspections, newest first (the latest 40). */
export function HistoryCard({ timeline }: HistoryCardProps) {
  return (
    <section className="card">
      <h2>History</h2>
      <ul className="timeline" data-testid="timeline">
        {timeline.slice(0, 40).map((t, i) => (
          <li key={i}>
            <span className="small muted">{WHEN.format(t.at)}</span>
            <span className={`kind ${t.kind}`}>{t.kind}</span>
            <span>{t.text}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}
