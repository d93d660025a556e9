import Link from "next/link";
import { ActionForm } from "@/app/_components/action-form";
import { TextField } from "@/app/_components/fields";
import { Sparkline } from "@/app/_components/sparkline";
import { StatusBadge } from "@/app/_components/status-badge";
import { roleAtLeast } from "@/lib/roles";
import { fleetDesignView } from "@/lib/server/fleet";
import { fleetOverview } from "@/lib/server/fleet-overview";
import { requireMember } from "@/lib/server/guard";
import { createAirframeAction } from "../actions";
import { ModeStrips } from "./_components/mode-strips";
import { WHEN_SHORT as WHEN } from "@/app/_components/dates";
import { scoreText } from "@/lib/view/score-text";

export const dynamic = "force-dynamic";

export default async function FleetPage() {
  const actor = await requireMember("viewer");
  const [rows, designs] = await Promise.all([fleetOverview(actor), fleetDesignView(actor)]);
  return (
    <>
      <h1>Fleet</h1>
      <div className="card">
        <table data-testid="fleet">
          <thead>
            <tr>
              <th>airframe</th>
              <th>state</th>
              <th>before the next heat</th>
              <th className="num">latest log score</th>
              <th>trend (last 10 logs)</th>
              <th>last flight</th>
              <th className="num">flights since baseline</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className={r.retired ? "retired-row" : undefined}>
                <td>
                  <Link href={`/airframes/${r.id}`}>
                    <strong>{r.name}</strong>
                  </Link>
                  <div className="muted small">{r.frameDesign}</div>
                </td>
                <td>{r.retired ? "retired" : r.state}</td>
                <td>
                  {r.status ? (
                    <>
                      <StatusBadge status={r.status} />
                      {r.firstReason ? <div className="muted small">{r.firstReason}</div> : null}
                    </>
                  ) : (
                    <span className="muted">{r.retired ? "–" : "no baseline"}</span>
                  )}
                </td>
                <td className="num">{scoreText(r.score)}</td>
                <td>
                  <Sparkline scores={r.trend} />
                </td>
                <td className="small">{r.lastFlight ? `${WHEN.format(r.lastFlight)} UTC` : "–"}</td>
                <td className="num">{r.flightsSinceBaseline ?? "–"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {designs.map((d) => (
        <section className="card space-above" key={d.design} data-testid="design-view">
          <h2>{d.design}: the fleet as its own reference</h2>
          <ModeStrips
            design={d.design}
            airframes={d.airframes}
            enough={d.enough}
            strips={d.strips}
          />
          {d.withoutBaseline.length > 0 ? (
            <>
              <h3>Judged against the fleet (no baseline of their own)</h3>
              <ul>
                {d.withoutBaseline.map((w) => (
                  <li key={w.name}>
                    <strong>{w.name}</strong>:{" "}
                    {w.notes.length === 0
                      ? "its latest log sits inside the fleet's range — still set a baseline of its own; fleet evidence alone never clears a quad."
                      : w.notes.join(" · ")}
                  </li>
                ))}
              </ul>
            </>
          ) : null}
        </section>
      ))}
      {roleAtLeast(actor.role, "tech") ? (
        <details className="action space-above">
          <summary>Add an airframe</summary>
          <ActionForm action={createAirframeAction} submitLabel="Add airframe">
            <div className="row">
              <TextField label="Name" name="name" placeholder="HV-09" />
              <TextField
                label="Frame design"
                name="frameDesign"
                defaultValue={rows[0]?.frameDesign ?? ""}
              />
              <TextField label="Serial" name="serial" />
            </div>
            <label>
              Notes
              <textarea name="notes" />
            </label>
          </ActionForm>
        </details>
      ) : null}
    </>
  );
}
