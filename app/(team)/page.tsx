import Link from "next/link";
import { AutoRefresh } from "@/app/_components/auto-refresh";
import { Caution } from "@/app/_components/caution";
import { PrintButton } from "@/app/_components/print-button";
import { StatusBadge } from "@/app/_components/status-badge";
import { requireMember } from "@/lib/server/guard";
import { inspectionQueue } from "@/lib/server/queue";
import { TIME } from "@/app/_components/dates";
import { scoreText } from "@/lib/view/score-text";

export const dynamic = "force-dynamic";

export default async function InspectionQueuePage({
  searchParams,
}: {
  searchParams: Promise<{ heat?: string }>;
}) {
  const actor = await requireMember("viewer");
  const onlyNextHeat = (await searchParams).heat === "next";
  const { entries, heat } = await inspectionQueue(actor, { onlyNextHeat });
  const needs = entries.filter((e) => e.status === "inspect" || e.status === "ground").length;
  return (
    <>
      <AutoRefresh seconds={20} />
      <h1>Inspection queue</h1>
      <p className="muted">
        {needs === 0
          ? "No airframe needs pulling before the next heat."
          : `${needs} airframe${needs === 1 ? "" : "s"} to pull and inspect before flying.`}{" "}
        {heat
          ? `Next heat: ${heat.event.name} ${heat.name} at ${TIME.format(heat.startsAt)} UTC.`
          : "No heat scheduled."}{" "}
        Refreshes every 20 s.
      </p>
      <div className="toolbar">
        <Link className="chip" href="/" aria-current={!onlyNextHeat}>
          Whole fleet
        </Link>
        {heat ? (
          <Link className="chip" href="/?heat=next" aria-current={onlyNextHeat}>
            Flying in {heat.name} ({heat.entries.length})
          </Link>
        ) : null}
        <PrintButton label="Print for the pit wall" />
      </div>
      <ol className="queue" data-testid="queue">
        {entries.map((e, i) => (
          <li key={e.id} className={`queue-row ${e.status}`} data-airframe={e.name}>
            <div className="rank">{i + 1}</div>
            <div>
              <div className="name">
                <Link href={`/airframes/${e.id}`}>{e.name}</Link>
              </div>
              {e.inNextHeat ? <span className="tag">next heat</span> : null}
            </div>
            <div>
              <StatusBadge status={e.status} />
              <div className="score" title="vibration score of the latest log against the baseline">
                {scoreText(e.score)} <small>/ 100</small>
              </div>
              <div className="muted small">vibration</div>
            </div>
            <ul>
              {e.reasons.length === 0 ? (
                <li className="muted">Matches its baseline; nothing else open.</li>
              ) : (
                e.reasons.map((r) => <li key={r}>{r}</li>)
              )}
            </ul>
          </li>
        ))}
      </ol>
      {entries.length === 0 ? (
        <p className="muted">No airframes yet: add them on the Fleet screen.</p>
      ) : null}
      <Caution />
    </>
  );
}
