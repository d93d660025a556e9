import Link from "next/link";
import { FindingsCard } from "@/app/_components/findings-table";
import { SpectraGrid, ThrottleMapCard } from "@/app/_components/spectra-grid";
import { AXES, type Axis } from "@/lib/logs/columns";
import { roleAtLeast } from "@/lib/roles";
import { airframeView } from "@/lib/server/airframe-view";
import { heatsOfAirframe } from "@/lib/server/events";
import { requireMember } from "@/lib/server/guard";
import { orNotFound } from "@/lib/server/pages";
import { partsInStock } from "@/lib/server/parts";
import { trendView } from "@/lib/server/trend-view";
import { LogsTable } from "./_components/logs-table";
import { TrendCharts } from "./_components/trend-charts";
import { WorkForms } from "./_components/work-forms";
import { AirframeHeader, HistoryCard, InstalledPartsCard } from "./cards";

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
  const { airframe, latest, analysis, baseline } = view;
  const canPilot = roleAtLeast(actor.role, "pilot");
  const canTech = roleAtLeast(actor.role, "tech");
  const [trends, stock, heats] = await Promise.all([
    trendView(airframe.id, actor.teamId, baseline),
    canTech ? partsInStock(actor) : [],
    canPilot ? heatsOfAirframe(actor, airframe.id) : [],
  ]);

  return (
    <>
      <p className="small">
        <Link href="/fleet">← Fleet</Link>
      </p>
      <AirframeHeader view={view} />

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
        analysed={view.logs.filter((l) => l.log.status === "analysed")}
      />
      <div className="grid two space-above">
        <InstalledPartsCard parts={view.parts} />
        <HistoryCard timeline={view.timeline} />
      </div>

      <LogsTable airframeId={airframe.id} logs={view.logs} canTech={canTech} />
    </>
  );
}
