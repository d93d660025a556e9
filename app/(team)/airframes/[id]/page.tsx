import Link from "next/link";
import { Caution } from "@/app/_components/caution";
import { SpectrumChart } from "@/app/_components/spectrum-chart";
import { StatusBadge } from "@/app/_components/status-badge";
import { ThrottleHeatmap } from "@/app/_components/throttle-heatmap";
import { AXES, type Axis } from "@/lib/logs/columns";
import { roleAtLeast } from "@/lib/roles";
import { airframeView } from "@/lib/server/airframe-view";
import { db } from "@/lib/server/db";
import { requireMember } from "@/lib/server/guard";
import { orNotFound } from "@/lib/server/pages";
import { LogsTable } from "./_components/logs-table";
import { WorkForms } from "./_components/work-forms";
import { WHEN } from "@/app/_components/dates";
import { DEFAULT_ANALYSIS, throttleBandLabel } from "@/lib/analysis/settings";

export const dynamic = "force-dynamic";

export default async function AirframePage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ axis?: string }> }) {
  const actor = await requireMember("viewer");
  const { id } = await params;
  const wanted = (await searchParams).axis;
  const heatAxis: Axis = AXES.find((a) => a === wanted) ?? "pitch";
  const view = await orNotFound(airframeView(actor, id));
  const { airframe, latest, analysis, baseline } = view;
  const canPilot = roleAtLeast(actor.role, "pilot");
  const canTech = roleAtLeast(actor.role, "tech");
  const stock = canTech ? await db.part.findMany({ where: { teamId: actor.teamId, status: "stock" }, orderBy: [{ kind: "asc" }, { model: "asc" }] }) : [];
  const heats = canPilot ? await db.heat.findMany({ where: { teamId: actor.teamId, entries: { some: { airframeId: airframe.id } } }, include: { event: true }, orderBy: { startsAt: "desc" }, take: 10 }) : [];
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
            {airframe.serial ? ` · serial ${airframe.serial}` : ""} · {airframe.status === "grounded" ? "GROUNDED" : "ready"}
            {airframe.retired ? " · retired" : ""}
          </div>
        </div>
        <div style={{ textAlign: "right" }}>
          {latest?.assessment ? <StatusBadge status={status} /> : <span className="muted">no score yet</span>}
          <div style={{ fontSize: "2rem", fontWeight: 800 }} data-testid="airframe-score">
            {latest?.assessment?.score === null || !latest?.assessment ? "–" : Math.round(latest.assessment.score)}
            <span className="muted small"> / 100</span>
          </div>
          <div className="muted small">
            {baseline ? `baseline of ${WHEN.format(baseline.createdAt)} · ${view.flightsSinceBaseline ?? 0} flight(s) since` : "no baseline yet"}
          </div>
        </div>
      </div>

      <section className="card" style={{ marginTop: "1rem" }}>
        <h2 style={{ marginTop: 0 }}>Findings of the latest log</h2>
        {!latest?.assessment ? (
          <p className="muted">{baseline ? "No log analysed against the baseline yet." : "Set a baseline from known-good logs to have later logs judged."}</p>
        ) : latest.assessment.findings.length === 0 ? (
          <p>No change from the baseline beyond the watch thresholds ({latest.log.fileName}).</p>
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
              {latest.assessment.findings.map((f) => (
                <tr key={`${f.kind}-${f.axis}-${f.freqHz}`}>
                  <td>
                    <StatusBadge status={f.severity} />
                  </td>
                  <td className="num">−{Math.round(f.points)}</td>
                  <td>{f.axis}</td>
                  <td>{f.text}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        {latest?.assessment && latest.assessment.notCompared.length > 0 ? (
          <p className="muted small">Not compared: {latest.assessment.notCompared.map((n) => `${n.what} (${n.reason})`).join("; ")}.</p>
        ) : null}
        <Caution compact />
      </section>

      <h2>Spectrum: latest log against the baseline, at matched throttle</h2>
      <p className="muted small">
        {analysis
          ? `${analysis.sampleRateHz} Hz log, ${analysis.durationS.toFixed(0)} s, Welch ${analysis.settings.window} ${analysis.settings.nperseg}-sample segments (${analysis.settings.binHz.toFixed(2)} Hz bins). PSD in dB re 1 (deg/s)²/Hz. Dots: peaks (dark: structural, amber: motor or unclassified).`
          : "No analysed log yet."}
      </p>
      <div className="grid three">
        {AXES.map((axis) => (
          <div className="card" key={axis}>
            <h3 style={{ marginTop: 0 }}>{axis}</h3>
            <SpectrumChart axis={axis} points={view.spectra[axis]} peaks={(analysis?.axes[axis].peaks ?? []).map((p) => ({ freqHz: Math.round(p.freqHz * 10) / 10, levelDb: p.levelDb, kind: p.kind }))} />
          </div>
        ))}
      </div>

      <h2>Throttle map</h2>
      <div className="toolbar">
        {AXES.map((a) => (
          <Link key={a} className="chip" href={`/airframes/${airframe.id}?axis=${a}`} aria-current={a === heatAxis}>
            {a}
          </Link>
        ))}
      </div>
      <div className="card">
        {analysis ? (
          <ThrottleHeatmap
            rows={analysis.throttleBands.map((b) => ({ label: throttleBandLabel(b.lo, b.hi), seconds: b.segments >= DEFAULT_ANALYSIS.minBandSegments ? b.seconds : 0, db: b.axes[heatAxis].psdDb }))}
            binHz={analysis.settings.binHz}
            fromHz={analysis.settings.minFreqHz}
            toHz={analysis.settings.maxFreqHz}
          />
        ) : (
          <p className="muted">No analysed log yet.</p>
        )}
      </div>

      <WorkForms airframe={{ id: airframe.id, status: airframe.status }} actorName={actor.name} canPilot={canPilot} canTech={canTech} stock={stock} heats={heats} analysed={analysed} />
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
                    {p.life.fraction !== null ? <strong style={{ color: p.life.fraction >= 1 ? "var(--ground)" : undefined }}> · {Math.round(p.life.fraction * 100)} %</strong> : null}
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
