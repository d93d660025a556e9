import Link from "next/link";
import { ActionForm } from "@/app/_components/action-form";
import { Caution } from "@/app/_components/caution";
import { SelectField, TextField } from "@/app/_components/fields";
import { SpectrumChart } from "@/app/_components/spectrum-chart";
import { StatusBadge } from "@/app/_components/status-badge";
import { ThrottleHeatmap } from "@/app/_components/throttle-heatmap";
import { AXES, type Axis } from "@/lib/logs/columns";
import { roleAtLeast } from "@/lib/roles";
import { airframeView } from "@/lib/server/airframe-view";
import { db } from "@/lib/server/db";
import { requireMember } from "@/lib/server/guard";
import { STANDARD_POSITIONS } from "@/lib/validations/airframe";
import { CRASH_SEVERITIES } from "@/lib/validations/crash";
import { INSPECTION_CHECKLIST } from "@/lib/validations/inspection";
import {
  logCrashAction,
  reanalyseAction,
  recordInspectionAction,
  setAirframeStatusAction,
  setBaselineAction,
  swapPartAction,
} from "../../actions";

export const dynamic = "force-dynamic";

const WHEN = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit", timeZone: "UTC" });

export default async function AirframePage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ axis?: string }> }) {
  const actor = await requireMember("viewer");
  const { id } = await params;
  const wanted = (await searchParams).axis;
  const heatAxis: Axis = AXES.find((a) => a === wanted) ?? "pitch";
  const view = await airframeView(actor, id);
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
            rows={analysis.throttleBands.map((b) => ({ label: `${Math.round(b.lo * 100)}–${Math.round(b.hi * 100)} %`, seconds: b.segments >= 4 ? b.seconds : 0, db: b.axes[heatAxis].psdDb }))}
            binHz={analysis.settings.binHz}
            fromHz={analysis.settings.minFreqHz}
            toHz={analysis.settings.maxFreqHz}
          />
        ) : (
          <p className="muted">No analysed log yet.</p>
        )}
      </div>

      <h2>Work on this airframe</h2>
      {!canPilot ? <p className="muted">Your role can view this airframe but not change it.</p> : null}
      <div className="grid two">
        {canPilot ? (
          <details className="action" data-testid="crash-form">
            <summary>Log a crash</summary>
            <ActionForm action={logCrashAction} submitLabel="Log crash">
              <input type="hidden" name="airframeId" value={airframe.id} />
              <div className="row">
                <TextField label="When" type="datetime-local" name="at" />
                <SelectField label="How hard" name="severity" options={CRASH_SEVERITIES} defaultValue="hard" />
                <SelectField label="Heat" name="heatId" defaultValue="" options={[{ value: "", label: "—" }, ...heats.map((h) => ({ value: h.id, label: `${h.event.name} ${h.name}` }))]} />
              </div>
              <fieldset>
                <legend className="small">Positions hit</legend>
                <div className="row">
                  {STANDARD_POSITIONS.filter((p) => p.startsWith("arm") || p === "props" || p === "camera" || p === "antenna").map((p) => (
                    <label key={p} className="inline">
                      <input type="checkbox" name="positions" value={p} /> {p}
                    </label>
                  ))}
                </div>
              </fieldset>
              <label>
                Note
                <textarea name="note" placeholder="what happened" />
              </label>
              <label className="inline">
                <input type="checkbox" name="ground" defaultChecked /> ground it until inspected (always for hard crashes)
              </label>
            </ActionForm>
          </details>
        ) : null}
        {canTech ? (
          <details className="action" data-testid="swap-form">
            <summary>Swap a part</summary>
            <ActionForm action={swapPartAction} submitLabel="Swap part">
              <input type="hidden" name="airframeId" value={airframe.id} />
              <div className="row">
                <SelectField label="Position" name="position" options={STANDARD_POSITIONS} />
                <SelectField label="New part (from stock)" name="newPartId" options={stock.map((p) => ({ value: p.id, label: `${p.kind} · ${p.model} ${p.label}` }))} />
              </div>
              <div className="row">
                <SelectField label="Old part goes to" name="removedStatus" options={["damaged", "stock", "scrapped"]} defaultValue="damaged" />
                <TextField label="When" type="datetime-local" name="at" />
              </div>
              <TextField label="Reason" name="reason" placeholder="cracked at the motor mount" />
            </ActionForm>
          </details>
        ) : null}
        {canTech ? (
          <details className="action" data-testid="inspection-form">
            <summary>Record an inspection</summary>
            <ActionForm action={recordInspectionAction} submitLabel="Sign off inspection">
              <input type="hidden" name="airframeId" value={airframe.id} />
              {INSPECTION_CHECKLIST.map((c) => (
                <label key={c} className="inline">
                  <input type="checkbox" name="checklist" value={c} /> {c}
                </label>
              ))}
              <label>
                Findings and work done
                <textarea name="findings" />
              </label>
              <label className="inline">
                <input type="checkbox" name="returnToService" defaultChecked /> return to service (signed off by {actor.name})
              </label>
            </ActionForm>
          </details>
        ) : null}
        {canTech ? (
          <details className="action" data-testid="baseline-form">
            <summary>Set the baseline from known-good logs</summary>
            <ActionForm action={setBaselineAction} submitLabel="Set baseline">
              <input type="hidden" name="airframeId" value={airframe.id} />
              {analysed.length === 0 ? <p className="muted">No analysed logs yet.</p> : null}
              {analysed.slice(0, 12).map(({ log, assessment }) => (
                <label key={log.id} className="inline">
                  <input type="checkbox" name="logIds" value={log.id} /> {WHEN.format(log.flownAt)} · {log.fileName}
                  {assessment ? ` · ${assessment.status}` : ""}
                </label>
              ))}
              <TextField label="Why these logs are known-good" name="reason" placeholder="new arms fitted and inspected" />
            </ActionForm>
          </details>
        ) : null}
        {canTech ? (
          <details className="action">
            <summary>{airframe.status === "grounded" ? "Return to service" : "Ground this airframe"}</summary>
            <ActionForm action={setAirframeStatusAction} submitLabel={airframe.status === "grounded" ? "Return to service" : "Ground it"} danger={airframe.status !== "grounded"}>
              <input type="hidden" name="airframeId" value={airframe.id} />
              <input type="hidden" name="status" value={airframe.status === "grounded" ? "ready" : "grounded"} />
              <TextField label="Note" name="note" />
            </ActionForm>
          </details>
        ) : null}
      </div>

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

      <section className="card" style={{ marginTop: "1rem" }}>
        <h2 style={{ marginTop: 0 }}>Logs</h2>
        <table data-testid="logs">
          <thead>
            <tr>
              <th>flown</th>
              <th>file</th>
              <th>rate</th>
              <th>status</th>
              <th className="num">score</th>
              <th />
            </tr>
          </thead>
          <tbody>
            {view.logs.map(({ log, assessment }) => (
              <tr key={log.id}>
                <td className="small">{WHEN.format(log.flownAt)}</td>
                <td>{log.fileName}</td>
                <td className="small">{log.sampleRateHz ? `${Math.round(log.sampleRateHz)} Hz · ${(log.durationS ?? 0).toFixed(0)} s` : "–"}</td>
                <td>{log.status === "failed" ? <span className="field-error">failed: {log.error}</span> : assessment ? <StatusBadge status={assessment.status} /> : log.status}</td>
                <td className="num">{assessment?.score === null || !assessment ? "–" : Math.round(assessment.score)}</td>
                <td>
                  {canTech && log.status !== "pending" ? (
                    <ActionForm action={reanalyseAction} submitLabel="Re-run analysis" compact>
                      <input type="hidden" name="logId" value={log.id} />
                      <input type="hidden" name="airframeId" value={airframe.id} />
                    </ActionForm>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </>
  );
}
