import { ActionForm } from "@/app/_components/action-form";
import { SelectField, TextField } from "@/app/_components/fields";
import type { Status } from "@/lib/health/thresholds";
import { STANDARD_POSITIONS } from "@/lib/validations/airframe";
import { CRASH_SEVERITIES } from "@/lib/validations/crash";
import { INSPECTION_CHECKLIST } from "@/lib/validations/inspection";
import {
  logCrashAction,
  recordInspectionAction,
  setAirframeStateAction,
  setBaselineAction,
  swapPartAction,
} from "../../../actions";
import { WHEN } from "@/app/_components/dates";

export interface WorkFormsProps {
  airframe: { id: string; state: string };
  actorName: string;
  canPilot: boolean;
  canTech: boolean;
  stock: { id: string; kind: string; model: string; label: string }[];
  heats: { id: string; name: string; event: { name: string } }[];
  analysed: {
    log: { id: string; fileName: string; flownAt: Date };
    assessment: { status: Status } | null;
  }[];
}

/** The airframe's actions, each shown only to the roles that may use it (the server checks again). */
export function WorkForms({
  airframe,
  actorName,
  canPilot,
  canTech,
  stock,
  heats,
  analysed,
}: WorkFormsProps) {
  return (
    <>
      <h2>Work on this airframe</h2>
      {!canPilot ? (
        <p className="muted">Your role can view this airframe but not change it.</p>
      ) : null}
      <div className="grid two">
        {canPilot ? (
          <details className="action" data-testid="crash-form">
            <summary>Log a crash</summary>
            <ActionForm action={logCrashAction} submitLabel="Log crash">
              <input type="hidden" name="airframeId" value={airframe.id} />
              <div className="row">
                <TextField label="When" type="datetime-local" name="at" />
                <SelectField
                  label="How hard"
                  name="severity"
                  options={CRASH_SEVERITIES}
                  defaultValue="hard"
                />
                <SelectField
                  label="Heat"
                  name="heatId"
                  defaultValue=""
                  options={[
                    { value: "", label: "—" },
                    ...heats.map((h) => ({ value: h.id, label: `${h.event.name} ${h.name}` })),
                  ]}
                />
              </div>
              <fieldset>
                <legend className="small">Positions hit</legend>
                <div className="row">
                  {STANDARD_POSITIONS.filter(
                    (p) =>
                      p.startsWith("arm") || p === "props" || p === "camera" || p === "antenna",
                  ).map((p) => (
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
                <input type="checkbox" name="ground" defaultChecked /> ground it until inspected
                (always for hard crashes)
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
                <SelectField
                  label="New part (from stock)"
                  name="newPartId"
                  options={stock.map((p) => ({
                    value: p.id,
                    label: `${p.kind} · ${p.model} ${p.label}`,
                  }))}
                />
              </div>
              <div className="row">
                <SelectField
                  label="Old part goes to"
                  name="removedStatus"
                  options={["damaged", "stock", "scrapped"]}
                  defaultValue="damaged"
                />
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
                <input type="checkbox" name="returnToService" defaultChecked /> return to service
                (signed off by {actorName})
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
                  <input type="checkbox" name="logIds" value={log.id} /> {WHEN.format(log.flownAt)}{" "}
                  · {log.fileName}
                  {assessment ? ` · ${assessment.status}` : ""}
                </label>
              ))}
              <TextField
                label="Why these logs are known-good"
                name="reason"
                placeholder="new arms fitted and inspected"
              />
            </ActionForm>
          </details>
        ) : null}
        {canTech ? (
          <details className="action">
            <summary>
              {airframe.state === "grounded" ? "Return to service" : "Ground this airframe"}
            </summary>
            <ActionForm
              action={setAirframeStateAction}
              submitLabel={airframe.state === "grounded" ? "Return to service" : "Ground it"}
              danger={airframe.state !== "grounded"}
            >
              <input type="hidden" name="airframeId" value={airframe.id} />
              <input
                type="hidden"
                name="state"
                value={airframe.state === "grounded" ? "ready" : "grounded"}
              />
              <TextField label="Note" name="note" />
            </ActionForm>
          </details>
        ) : null}
      </div>
    </>
  );
}
