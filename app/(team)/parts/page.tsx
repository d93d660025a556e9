import Link from "next/link";
import { ActionForm } from "@/app/_components/action-form";
import { SelectField, TextField } from "@/app/_components/fields";
import { roleAtLeast } from "@/lib/roles";
import { requireMember } from "@/lib/server/guard";
import { orNotFound } from "@/lib/server/pages";
import { listParts, partHistory, stockSummary } from "@/lib/server/parts";
import { PART_KINDS } from "@/lib/validations/part";
import { addPartsAction, setPartStatusAction } from "../actions";
import { DAY } from "@/app/_components/dates";

export const dynamic = "force-dynamic";

export default async function PartsPage({
  searchParams,
}: {
  searchParams: Promise<{ part?: string; kind?: string; fitted?: string }>;
}) {
  const actor = await requireMember("viewer");
  const { part: partId, kind, fitted } = await searchParams;
  const withFitted = fitted === "1";
  const query = (k: string | undefined, f: boolean) => {
    const q = new URLSearchParams();
    if (k) q.set("kind", k);
    if (f) q.set("fitted", "1");
    const text = q.toString();
    return text ? `/parts?${text}` : "/parts";
  };
  const summary = await stockSummary(actor);
  const history = partId ? await orNotFound(partHistory(actor, partId)) : null;
  const canTech = roleAtLeast(actor.role, "tech");
  const parts = await listParts(actor, { kind, withFitted });
  return (
    <>
      <h1>Parts</h1>
      {history ? (
        <section className="card" data-testid="part-history">
          <h2>
            {history.part.kind} · {history.part.model} {history.part.label}
          </h2>
          <p className="muted">
            {history.part.status} · {history.life.flights} flights,{" "}
            {history.life.minutes.toFixed(0)} min in all
            {history.part.lifeFlights ? ` · life limit ${history.part.lifeFlights} flights` : ""}
            {history.part.supplier ? ` · from ${history.part.supplier}` : ""}
            {history.part.cost !== null ? ` · ${history.part.cost.toFixed(2)}` : ""}
          </p>
          <table>
            <thead>
              <tr>
                <th>airframe</th>
                <th>position</th>
                <th>on</th>
                <th>off</th>
                <th>why</th>
              </tr>
            </thead>
            <tbody>
              {history.installs.map((i) => (
                <tr key={i.id}>
                  <td>{i.airframe.name}</td>
                  <td>{i.position}</td>
                  <td>{DAY.format(i.fromAt)}</td>
                  <td>{i.toAt ? DAY.format(i.toAt) : "still fitted"}</td>
                  <td>
                    {i.reason}
                    {i.removalReason ? ` → off: ${i.removalReason}` : ""}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <p>
            <Link href="/parts">Close</Link>
          </p>
        </section>
      ) : null}

      <h2 id="stock-heading">Stock by kind and model</h2>
      {/* Focusable, so a keyboard can scroll it where the table is wider than a phone. */}
      <div className="card" role="region" aria-labelledby="stock-heading" tabIndex={0}>
        <table data-testid="stock">
          <thead>
            <tr>
              <th>kind</th>
              <th>model</th>
              <th className="num">in stock</th>
              <th className="num">fitted</th>
              <th className="num">damaged</th>
              <th className="num">scrapped</th>
              <th>
                <span className="visually-hidden">stock warning</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {summary.map((g) => (
              <tr key={`${g.kind}-${g.model}`}>
                <td>{g.kind}</td>
                <td>{g.model}</td>
                <td className="num">{g.stock}</td>
                <td className="num">{g.installed}</td>
                <td className="num">{g.damaged}</td>
                <td className="num">{g.scrapped}</td>
                <td>
                  {g.low ? (
                    <strong className="low-stock">low stock: fewer than 2 spares</strong>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>

      {canTech ? (
        <details className="action space-above">
          <summary>Add parts to stock</summary>
          <ActionForm action={addPartsAction} submitLabel="Add to stock">
            <div className="row">
              <SelectField label="Kind" name="kind" options={PART_KINDS} />
              <TextField label="Model" name="model" />
              <TextField
                label="How many"
                name="quantity"
                type="number"
                min={1}
                max={200}
                defaultValue={1}
              />
              <TextField label="Label" name="label" placeholder="spare-arm" />
            </div>
            <div className="row">
              <TextField label="Supplier" name="supplier" />
              <TextField label="Cost each" name="cost" inputMode="decimal" />
              <TextField label="Acquired" name="acquiredAt" type="date" />
              <TextField label="Life (flights)" name="lifeFlights" inputMode="numeric" />
              <TextField label="Life (minutes)" name="lifeMinutes" inputMode="numeric" />
            </div>
          </ActionForm>
        </details>
      ) : null}

      <h2>{withFitted ? "Every part" : "Parts not fitted: spares, damaged, scrapped"}</h2>
      <div className="toolbar">
        <Link className="chip" href={query(undefined, withFitted)} aria-current={!kind}>
          all kinds
        </Link>
        {PART_KINDS.map((k) => (
          <Link key={k} className="chip" href={query(k, withFitted)} aria-current={kind === k}>
            {k}
          </Link>
        ))}
        <Link className="chip" href={query(kind, !withFitted)} aria-current={withFitted}>
          {withFitted ? "hide fitted parts" : "show fitted parts too"}
        </Link>
      </div>
      <div className="card">
        <table>
          <thead>
            <tr>
              <th>part</th>
              <th>status</th>
              <th>where</th>
              <th>
                <span className="visually-hidden">change status</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {parts.map((p) => (
              <tr key={p.id}>
                <td>
                  <Link href={`/parts?part=${p.id}`}>
                    {p.kind} · {p.model}
                  </Link>{" "}
                  <span className="muted small">{p.label}</span>
                </td>
                <td>{p.status}</td>
                <td>
                  {p.installations[0]
                    ? `${p.installations[0].airframe.name}, ${p.installations[0].position}`
                    : "–"}
                </td>
                <td>
                  {canTech && p.status !== "installed" ? (
                    <ActionForm action={setPartStatusAction} submitLabel="Set" compact>
                      <input type="hidden" name="partId" value={p.id} />
                      <select
                        name="status"
                        defaultValue={p.status}
                        aria-label={`status of ${p.kind} ${p.model} ${p.label}`}
                      >
                        <option>stock</option>
                        <option>damaged</option>
                        <option>scrapped</option>
                      </select>
                    </ActionForm>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </>
  );
}
