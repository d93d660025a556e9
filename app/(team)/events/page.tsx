import { ActionForm } from "@/app/_components/action-form";
import { TextField } from "@/app/_components/fields";
import { roleAtLeast } from "@/lib/roles";
import { airframesInService } from "@/lib/server/airframes";
import { listEvents } from "@/lib/server/events";
import { requireMember } from "@/lib/server/guard";
import { createEventAction, createHeatAction, setHeatEntriesAction } from "../actions";
import { WEEKDAY_TIME as WHEN } from "@/app/_components/dates";

export const dynamic = "force-dynamic";

export default async function EventsPage() {
  const actor = await requireMember("viewer");
  const [events, airframes] = await Promise.all([listEvents(actor), airframesInService(actor)]);
  const canTech = roleAtLeast(actor.role, "tech");
  return (
    <>
      <h1>Events and heats</h1>
      <p className="muted">
        Times in UTC. The inspection queue can show just the airframes of the next heat.
      </p>
      {events.map((e) => (
        <section className="card space-below" key={e.id} data-testid="event">
          <h2>
            {e.name}{" "}
            <span className="muted small">
              {e.venue} · {WHEN.format(e.startsAt)}
            </span>
          </h2>
          <table>
            <thead>
              <tr>
                <th>heat</th>
                <th>starts</th>
                <th>airframes</th>
              </tr>
            </thead>
            <tbody>
              {e.heats.map((h) => (
                <tr key={h.id}>
                  <td>{h.name}</td>
                  <td>{WHEN.format(h.startsAt)}</td>
                  <td>
                    {h.entries.map((x) => x.airframe.name).join(", ") || (
                      <span className="muted">none yet</span>
                    )}
                    {canTech ? (
                      <details className="action space-above-xs">
                        <summary>Assign airframes</summary>
                        <ActionForm action={setHeatEntriesAction} submitLabel="Save heat">
                          <input type="hidden" name="heatId" value={h.id} />
                          <div className="row">
                            {airframes.map((a) => (
                              <label key={a.id} className="inline">
                                <input
                                  type="checkbox"
                                  name="airframeIds"
                                  value={a.id}
                                  defaultChecked={h.entries.some((x) => x.airframeId === a.id)}
                                />{" "}
                                {a.name}
                              </label>
                            ))}
                          </div>
                        </ActionForm>
                      </details>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {canTech ? (
            <details className="action space-above-sm">
              <summary>Add a heat</summary>
              <ActionForm action={createHeatAction} submitLabel="Add heat" className="row">
                <input type="hidden" name="eventId" value={e.id} />
                <TextField label="Name" name="name" placeholder={`Heat ${e.heats.length + 1}`} />
                <TextField label="Starts (UTC)" name="startsAt" type="datetime-local" />
              </ActionForm>
            </details>
          ) : null}
        </section>
      ))}
      {canTech ? (
        <details className="action">
          <summary>Add an event</summary>
          <ActionForm action={createEventAction} submitLabel="Add event">
            <div className="row">
              <TextField label="Name" name="name" />
              <TextField label="Venue" name="venue" />
              <TextField label="Starts (UTC)" name="startsAt" type="datetime-local" />
            </div>
          </ActionForm>
        </details>
      ) : null}
    </>
  );
}
