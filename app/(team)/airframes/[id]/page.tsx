import Link from "next/link";
import { FindingsCard } from "@/app/_components/findings-table";
import { SpectraGrid, ThrottleMapCard } from "@/app/_components/spectra-grid";
import { StatusBadge } from "@/app/_components/status-badge";
import { AXES, type Axis } from "@/lib/logs/columns";
import { roleAtLeast } from "@/lib/roles";
import { airframeView } from "@/lib/server/airframe-view";
import { db } from "@/lib/server/db";
import { requireMember } from "@/lib/server/guard";
import { orNotFound } from "@/lib/server/pages";
import { trendView } from "@/lib/server/trend-view";
import { LogsTable } from "./_components/logs-table";
import { TrendCharts } from "./_components/trend-charts";
import { WorkForms } from "./_components/work-forms";
import { WHEN } from "@/app/_components/dates";

export const dynamic = "force-dynamic";

export default async function AirframePage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ axis?: string }>;
}) {
  const actor = await requireMember("viewer");
  const { id } = await params;
  const wanted = (await searchParams).axis;
  const heatAxis: Axis = AXES.find((a) => a === wanted) ?? "pitch";
  const view = await orNotFound(airframeView(actor, id));
  const trends = await trendView(view.airframe.id, actor.teamId, view.baseline);
  const { airframe, latest, analysis, baseline } = view;
  const canPilot = roleAtLeast(actor.role, "pilot");
  const canTech = roleAtLeast(actor.role, "tech");
  const stock = canTech
    ? await db.part.findMany({
        where: { teamId: actor.teamId, status: "stock" },
        orderBy: [{ kind: "asc" }, { model: "asc" }],
      })
    : [];
  const heats = canPilot
    ? await db.heat.findMany({
        where: { teamId: actor.teamId, entries: { some: { airframeId: airframe.id } } },
        include: { event: true },
        orderBy: { startsAt: "desc" },
        take: 10,
      })
    : [];
  const analysed = view.logs.filter((l) => l.log.status === "analysed");
  const status = latest?.assessment?.status ?? "ok";

  return (
    <>
      <p className="small">
        <Link href="/fleet">← Fleet</Link>
      </p>
      <div className="row" style={{ alignItems: "center" }}>
        <div>
          <h1 style={{ marginBottom: 0 }}>{airframe.name}</h1>
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
        <div style={{ textAlign: "right" }}>
          {latest?.assessment ? (
            <StatusBadge status={status} />
          ) : (
            <span className="muted">no score yet</span>
          )}
          <div style={{ fontSize: "2rem", fontWeight: 800 }} data-testid="airframe-score">
            {latest?.assessment?.score === null || !latest?.assessment
              ? "–"
              : Math.round(latest.assessment.score)}
            <span className="muted small"> / 100</span>
          </div>
          <div className="muted small">
            {baseline
              ? `baseline of ${WHEN.format(baseline.createdAt)} · ${view.flightsSinceBaseline ?? 0} flight(s) since`
              : "no baseline yet"}
          </div>
        </div>
      </div>

      <FindingsCard
        title="Findings of the latest log"
        assessment={latest?.assessment ?? null}
        fileName={latest?.log.fileName}
        notJudged={
          baseline
            ? "No log analysed against the baseline yet."
            : "Set a baseline from known-good logs to have later logs judged."
        }
      />
      {view.analysedLogId ? (
        <p className="small">
          <Link href={`/logs/${view.analysedLogId}`}>Open the latest log</Link> (its orders per
          motor, metadata and the fleet&apos;s view of it)
        </p>
      ) : null}

      <h2>Spectrum: latest log against the baseline, at matched throttle</h2>
      <SpectraGrid analysis={analysis} spectra={view.spectra} />

      <h2>Trends against the baseline</h2>
      {trends ? (
        <>
          <p className="muted small">
            One point per analysed log (newest {trends.rows.length}); dashed lines: watch, inspect
            and ground thresholds; grey lines: crashes, swaps, inspections and baselines. Click a
            point to open its log.
          </p>
          <TrendCharts
            rows={trends.rows}
            modes={trends.modes}
            events={trends.events}
            thresholds={trends.thresholds}
          />
        </>
      ) : (
        <p className="muted">
          Set a baseline to follow this airframe&apos;s modes and levels over time.
        </p>
      )}

      <h2>Throttle map</h2>
      <ThrottleMapCard analysis={analysis} axis={heatAxis} href={`/airframes/${airframe.id}`} />

      <WorkForms
        airframe={{ id: airframe.id, state: airframe.state }}
        actorName={actor.name}
        canPilot={canPilot}
        canTech={canTech}
        stock={stock}
        heats={heats}
        analysed={analysed}
      />
      <div className="grid two" style={{ marginTop: "1rem" }}>
        <section className="card">
          <h2 style={{ marginTop: 0 }}>Installed parts</h2>
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
              {view.parts.map((p) => (
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
                      <strong style={{ color: p.life.fraction >= 1 ? "var(--ground)" : undefined }}>
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
        <section className="card">
          <h2 style={{ marginTop: 0 }}>History</h2>
          <ul className="timeline" data-testid="timeline">
            {view.timeline.slice(0, 40).map((t, i) => (
              <li key={i}>
                <span className="small muted">{WHEN.format(t.at)}</span>
                <span className={`kind ${t.kind}`}>{t.kind}</span>
                <span>{t.text}</span>
              </li>
            ))}
          </ul>
        </section>
      </div>

      <LogsTable airframeId={airframe.id} logs={view.logs} canTech={canTech} />
    </>
  );
}
