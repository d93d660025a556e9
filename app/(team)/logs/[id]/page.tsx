import Link from "next/link";
import { WHEN } from "@/app/_components/dates";
import { FindingsCard } from "@/app/_components/findings-table";
import { SpectraGrid, ThrottleMapCard } from "@/app/_components/spectra-grid";
import { StatusBadge } from "@/app/_components/status-badge";
import { AXES, type Axis } from "@/lib/logs/columns";
import { requireMember } from "@/lib/server/guard";
import { logView } from "@/lib/server/log-view";
import { orNotFound } from "@/lib/server/pages";
import { MotorOrdersChart } from "./_components/motor-orders-chart";
import { scoreText } from "@/lib/view/score-text";

export const dynamic = "force-dynamic";

export default async function LogPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ axis?: string }>;
}) {
  const actor = await requireMember("viewer");
  const { id } = await params;
  const wanted = (await searchParams).axis;
  const axis: Axis = AXES.find((a) => a === wanted) ?? "pitch";
  const view = await orNotFound(logView(actor, id));
  const { log, airframe, analysis, assessment } = view;
  const metadata = Object.entries(analysis?.metadata ?? {});
  return (
    <>
      <p className="small">
        {airframe ? (
          <Link href={`/airframes/${airframe.id}`}>← {airframe.name}</Link>
        ) : (
          <Link href="/fleet">← Fleet</Link>
        )}
      </p>
      <div className="row align-center">
        <div>
          <h1 className="page-title">{log.fileName}</h1>
          <div className="muted">
            {airframe ? `${airframe.name} · ` : "no airframe · "}flown {WHEN.format(log.flownAt)}{" "}
            UTC · {log.status}
            {log.error ? `: ${log.error}` : ""}
          </div>
        </div>
        <div className="verdict">
          {assessment ? (
            <StatusBadge status={assessment.status} />
          ) : (
            <span className="muted">not judged</span>
          )}
          <div className="big-score" data-testid="log-score">
            {scoreText(assessment?.score)}
            <span className="muted small"> / 100</span>
          </div>
          <div className="muted small">
            {assessment
              ? `against the ${assessment.baseline.active ? "active" : "earlier"} baseline of ${WHEN.format(assessment.baseline.createdAt)}`
              : "no baseline to judge it by"}
          </div>
        </div>
      </div>

      <FindingsCard
        title="Findings against the baseline"
        assessment={assessment}
        notJudged="This log was not judged against a baseline: set one from known-good logs of this airframe."
      />

      <section className="card space-above" data-testid="fleet-view">
        <h2>Against the fleet</h2>
        {view.fleet.airframes === 0 ? (
          <p className="muted">
            Fewer than three sister airframes of this design have a baseline: not enough to place
            this log against the fleet.
          </p>
        ) : view.fleet.notes.length === 0 ? (
          <p>
            Its modes and levels sit inside the range of {view.fleet.airframes} sister airframes of{" "}
            {airframe?.frameDesign}. The fleet is a second opinion, never a clearance.
          </p>
        ) : (
          <ul>
            {view.fleet.notes.map((n) => (
              <li key={n.text}>
                <StatusBadge status={n.severity} /> {n.text}
              </li>
            ))}
          </ul>
        )}
      </section>

      <h2>Spectrum against the baseline, at matched throttle</h2>
      <SpectraGrid analysis={analysis} spectra={view.spectra} currentLabel="this log" />

      <h2>Throttle map</h2>
      <ThrottleMapCard analysis={analysis} axis={axis} href={`/logs/${log.id}`} />

      <h2 id="orders-heading">Motor orders</h2>
      {view.orders && view.orders.motors.length > 0 ? (
        <div
          className="card scroll-x space-below"
          role="region"
          aria-labelledby="orders-heading"
          // Focusable, so a keyboard can scroll it where the table is wider than the screen.
          tabIndex={0}
        >
          <table data-testid="order-table">
            <caption className="muted small">
              Each motor&apos;s order spectrum over the log: level on the loudest axis, dB re 1
              (deg/s)², power-averaged over the throttle bands flown. The loudest motor of each
              order is in bold.
            </caption>
            <thead>
              <tr>
                <th scope="col">motor</th>
                <th scope="col" className="num">
                  mean rpm
                </th>
                <th scope="col" className="num">
                  telemetry masked
                </th>
                {view.orders.labels.map((l) => (
                  <th scope="col" className="num" key={l}>
                    {l}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {view.orders.motors.map((m) => (
                <tr key={m.motor}>
                  <th scope="row">{m.name}</th>
                  <td className="num">{m.meanRpm}</td>
                  <td className="num">{Math.round(m.maskedShare * 100)} %</td>
                  {m.levels.map((v, i) => {
                    const column = view.orders?.motors.map((x) => x.levels[i] ?? -Infinity) ?? [];
                    const loudest = v !== null && v === Math.max(...column);
                    return (
                      <td className="num" key={i} style={loudest ? { fontWeight: 800 } : undefined}>
                        {v === null ? "–" : v.toFixed(1)}
                      </td>
                    );
                  })}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      <div className="card">
        <MotorOrdersChart motors={view.motors} />
        {view.motors.length > 0 ? (
          <p className="muted small">
            1× order (once per revolution) of each motor through the flight, measured by order
            tracking from its rpm column.
          </p>
        ) : null}
      </div>

      <div className="grid two space-above">
        <section className="card">
          <h2>Metadata</h2>
          {metadata.length === 0 ? (
            <p className="muted">The file had no metadata lines.</p>
          ) : (
            <table>
              <tbody>
                {metadata.map(([k, v]) => (
                  <tr key={k}>
                    <th scope="row">{k}</th>
                    <td className="wrap-anywhere">{v}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
        <section className="card">
          <h2>How it was read</h2>
          {analysis ? (
            <ul className="small">
              <li>
                {analysis.sampleRateHz} Hz, {analysis.durationS.toFixed(1)} s, {analysis.samples}{" "}
                samples, {(log.sizeBytes / 1e6).toFixed(1)} MB
              </li>
              <li>
                {analysis.gaps.length} gap{analysis.gaps.length === 1 ? "" : "s"},{" "}
                {analysis.droppedRows} dropped row{analysis.droppedRows === 1 ? "" : "s"}
              </li>
              {log.mapText ? (
                <li>
                  column map: <code className="wrap-anywhere">{log.mapText}</code>
                </li>
              ) : null}
              {analysis.guesses.map((g) => (
                <li key={g}>{g}</li>
              ))}
            </ul>
          ) : (
            <p className="muted">Not analysed{log.error ? `: ${log.error}` : " yet"}.</p>
          )}
        </section>
      </div>
    </>
  );
}
