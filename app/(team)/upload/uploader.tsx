"use client";

import { useRouter } from "next/navigation";
import { useCallback, useRef, useState, type DragEvent } from "react";
import { formatColumnMap, proposeColumnMap } from "@/lib/logs/columns";
import { draftOf, draftToMap, previewRows } from "@/lib/logs/map-preview";
import { matchAirframe, sniffLogHead } from "@/lib/logs/sniff";
import { ColumnMapTable } from "./_components/column-map-table";
import { saveProfileAction } from "../actions";

export interface UploaderProps {
  airframes: { id: string; name: string }[];
  profiles: { name: string; mapText: string }[];
}

type Phase =
  | "ready"
  | "needs-airframe"
  | "needs-map"
  | "uploading"
  | "analysing"
  | "done"
  | "failed"
  | "skipped";

interface Item {
  key: string;
  file: File;
  airframeId: string;
  matchedBy: string;
  canonical: boolean;
  mapText: string;
  headers: string[];
  /** The first data rows, for the column-map table's preview. */
  rows: (number | null)[][];
  guesses: string[];
  phase: Phase;
  uploadFraction: number;
  analysisFraction: number;
  message: string;
  logId?: string;
}

// As far into a file as the reader looks for the header row (it must start within 4 MiB, and a
// line may be 1 MiB long: lib/logs/preamble.ts), so that long metadata reads the same here as on
// the server and the header line is never cut.
const HEAD_BYTES = 5 * 1024 * 1024;

/** True when a map text binds every needed field, once each. */
function mapComplete(mapText: string): boolean {
  return mapText !== "" && draftToMap(draftOf(mapText)).problem === null;
}

export function Uploader({ airframes, profiles }: UploaderProps) {
  const router = useRouter();
  const [items, setItems] = useState<Item[]>([]);
  const [over, setOver] = useState(false);
  const [profileName, setProfileName] = useState("");
  const [profileNote, setProfileNote] = useState("");
  const itemsRef = useRef<Item[]>([]);
  itemsRef.current = items;

  const update = useCallback((key: string, patch: Partial<Item>) => {
    setItems((list) => list.map((i) => (i.key === key ? { ...i, ...patch } : i)));
  }, []);

  async function add(files: File[]) {
    const fresh: Item[] = [];
    for (const file of files) {
      const key = `${file.name}-${file.size}-${file.lastModified}-${Math.random()}`;
      if (!/\.(csv|txt)$/i.test(file.name)) {
        fresh.push({
          key,
          file,
          airframeId: "",
          matchedBy: "",
          canonical: false,
          mapText: "",
          headers: [],
          rows: [],
          guesses: [],
          phase: "skipped",
          uploadFraction: 0,
          analysisFraction: 0,
          message: "not a .csv log; skipped",
        });
        continue;
      }
      const text = await file.slice(0, HEAD_BYTES).text();
      const head = sniffLogHead(text);
      const rows = head ? previewRows(text, head.line) : [];
      const match = matchAirframe(
        airframes.map((a) => a.name),
        { metadataAirframe: head?.metadata.airframe, fileName: file.name },
      );
      const airframeId = match ? (airframes.find((a) => a.name === match.name)?.id ?? "") : "";
      const canonical = head?.canonical ?? false;
      // The proposal again with the first rows, so a time column can also be told by rising values.
      const proposal = head ? proposeColumnMap(head.headers, rows) : undefined;
      const mapText = !canonical && proposal ? formatColumnMap(proposal.map) : "";
      fresh.push({
        key,
        file,
        airframeId,
        matchedBy: match ? `matched by ${match.how}` : "no match: choose",
        canonical,
        mapText,
        headers: head?.headers ?? [],
        rows,
        guesses: proposal?.guesses ?? [],
        phase: !head
          ? "failed"
          : !airframeId
            ? "needs-airframe"
            : canonical
              ? "ready"
              : "needs-map",
        uploadFraction: 0,
        analysisFraction: 0,
        message: !head
          ? "no header row found: not a CSV flight log"
          : proposal && proposal.missing.length > 0
            ? `no column for ${proposal.missing.join(", ")}: give a map`
            : "",
      });
    }
    setItems((list) => [...list, ...fresh]);
  }

  function onDrop(e: DragEvent<HTMLDivElement>) {
    e.preventDefault();
    setOver(false);
    void add(Array.from(e.dataTransfer.files));
  }

  function upload(item: Item): Promise<void> {
    return new Promise((resolve) => {
      const form = new FormData();
      form.append("airframeId", item.airframeId);
      if (!item.canonical && item.mapText) form.append("mapText", item.mapText);
      form.append("file", item.file, item.file.name);
      const xhr = new XMLHttpRequest();
      xhr.open("POST", "/api/v1/logs");
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) update(item.key, { uploadFraction: e.loaded / e.total });
      };
      xhr.onload = () => {
        let body: { logId?: string; error?: string; duplicate?: boolean; airframe?: string } = {};
        try {
          body = JSON.parse(xhr.responseText) as typeof body;
        } catch {
          body = { error: `the server answered ${xhr.status}` };
        }
        if (xhr.status >= 200 && xhr.status < 300 && body.logId) {
          update(item.key, {
            phase: "analysing",
            uploadFraction: 1,
            logId: body.logId,
            message: body.duplicate
              ? `already uploaded (for ${body.airframe ?? "?"}): showing its verdict`
              : "",
          });
          void poll(item.key, body.logId).then(resolve);
        } else {
          update(item.key, {
            phase: "failed",
            message: body.error ?? `upload failed (${xhr.status})`,
          });
          resolve();
        }
      };
      xhr.onerror = () => {
        update(item.key, {
          phase: "failed",
          message: "the connection dropped during the upload; nothing was kept, try again",
        });
        resolve();
      };
      update(item.key, { phase: "uploading", message: "" });
      xhr.send(form);
    });
  }

  async function poll(key: string, logId: string): Promise<void> {
    for (;;) {
      await new Promise((r) => setTimeout(r, 800));
      const res = await fetch(`/api/v1/logs/${logId}`, { cache: "no-store" });
      if (!res.ok) continue;
      const s = (await res.json()) as {
        status: string;
        progress: number;
        error: string | null;
        verdict: { score: number | null; status: string } | null;
      };
      if (s.status === "pending") {
        update(key, { analysisFraction: s.progress });
        continue;
      }
      if (s.status === "failed")
        update(key, { phase: "failed", message: s.error ?? "analysis failed" });
      else
        update(key, {
          phase: "done",
          analysisFraction: 1,
          message: s.verdict
            ? `${s.verdict.status.toUpperCase()} · score ${s.verdict.score === null ? "–" : Math.round(s.verdict.score)}`
            : "analysed (no baseline yet to compare with)",
        });
      return;
    }
  }

  async function importAll() {
    const queue = itemsRef.current.filter(
      (i) => i.phase === "ready" || (i.phase === "needs-map" && mapComplete(i.mapText)),
    );
    // Two at a time: the pit laptop's link and the analysis workers both stay busy.
    const workers = [0, 1].map(async () => {
      for (let next = queue.shift(); next; next = queue.shift()) await upload(next);
    });
    await Promise.all(workers);
    router.refresh();
  }

  async function saveProfile(mapText: string) {
    const form = new FormData();
    form.set("name", profileName);
    form.set("mapText", mapText);
    const r = await saveProfileAction({ ok: false, message: "" }, form);
    setProfileNote(r.message + (r.fieldErrors ? ` ${Object.values(r.fieldErrors).join(" ")}` : ""));
  }

  const pendingMaps = items.filter((i) => i.phase === "needs-map");
  const importable = items.filter(
    (i) => i.phase === "ready" || (i.phase === "needs-map" && mapComplete(i.mapText)),
  ).length;

  return (
    <div data-testid="uploader">
      <div
        className={`dropzone ${over ? "over" : ""}`}
        onDragOver={(e) => {
          e.preventDefault();
          setOver(true);
        }}
        onDragLeave={() => setOver(false)}
        onDrop={onDrop}
      >
        <p>
          <strong>Drop log files or a folder here</strong>
        </p>
        <div className="row" style={{ justifyContent: "center" }}>
          <label className="inline" style={{ flex: "0 0 auto" }}>
            Files{" "}
            <input
              type="file"
              multiple
              accept=".csv,.txt"
              data-testid="file-input"
              onChange={(e) => void add(Array.from(e.target.files ?? []))}
            />
          </label>
          <label className="inline" style={{ flex: "0 0 auto" }}>
            Folder{" "}
            <input
              type="file"
              multiple
              ref={(el) => {
                if (el) el.setAttribute("webkitdirectory", "");
              }}
              onChange={(e) => void add(Array.from(e.target.files ?? []))}
            />
          </label>
        </div>
      </div>

      {pendingMaps.length > 0 ? (
        <section className="card" style={{ marginTop: "1rem" }} data-testid="map-step">
          <h2 style={{ marginTop: 0 }}>Which column is which</h2>
          <p className="muted small">
            These files do not use heatcheck&apos;s own column names. Check each field&apos;s column
            and unit; the last column shows the first rows as heatcheck will read them.
          </p>
          {pendingMaps.map((i) => (
            <div key={i.key} style={{ marginBottom: "0.8rem" }}>
              {i.guesses.length > 0 ? (
                <details className="small">
                  <summary>What was guessed from the headers ({i.guesses.length})</summary>
                  <ul>
                    {i.guesses.map((g) => (
                      <li key={g}>{g}</li>
                    ))}
                  </ul>
                </details>
              ) : null}
              <ColumnMapTable
                fileName={i.file.name}
                headers={i.headers}
                rows={i.rows}
                mapText={i.mapText}
                onChange={(mapText) =>
                  update(i.key, {
                    mapText,
                    message: mapComplete(mapText) ? "" : "the column map is not complete yet",
                  })
                }
              />
              <div className="row">
                <details style={{ flex: "3 1 400px" }}>
                  <summary className="small">
                    The same map as text (for the command line and import profiles)
                  </summary>
                  <label>
                    Map text
                    <input
                      value={i.mapText}
                      onChange={(e) => update(i.key, { mapText: e.target.value })}
                    />
                  </label>
                  <p className="muted small">
                    <code>key=Header|unit</code> entries separated by commas, e.g.{" "}
                    <code>time=Time (us)|us,roll=GyroX|rad/s</code>
                  </p>
                </details>
                {profiles.length > 0 ? (
                  <label>
                    Import profile
                    <select
                      defaultValue=""
                      onChange={(e) =>
                        update(i.key, {
                          mapText:
                            profiles.find((p) => p.name === e.target.value)?.mapText ?? i.mapText,
                        })
                      }
                    >
                      <option value="">—</option>
                      {profiles.map((p) => (
                        <option key={p.name}>{p.name}</option>
                      ))}
                    </select>
                  </label>
                ) : null}
              </div>
              <div className="row" style={{ alignItems: "end" }}>
                <label>
                  Save this map as a profile named
                  <input
                    value={profileName}
                    onChange={(e) => setProfileName(e.target.value)}
                    placeholder="logger model"
                  />
                </label>
                <div>
                  <button
                    type="button"
                    className="secondary"
                    onClick={() => void saveProfile(i.mapText)}
                  >
                    Save profile
                  </button>
                </div>
              </div>
            </div>
          ))}
          {profileNote ? (
            <p className="form-message" data-testid="profile-note">
              {profileNote}
            </p>
          ) : null}
        </section>
      ) : null}

      {items.length > 0 ? (
        <section className="card" style={{ marginTop: "1rem" }}>
          <table data-testid="upload-list">
            <thead>
              <tr>
                <th>file</th>
                <th>airframe</th>
                <th>upload</th>
                <th>analysis</th>
                <th>result</th>
              </tr>
            </thead>
            <tbody>
              {items.map((i) => (
                <tr key={i.key} data-file={i.file.name} data-phase={i.phase}>
                  <td>
                    {i.file.name}
                    <div className="muted small">{(i.file.size / 1e6).toFixed(1)} MB</div>
                  </td>
                  <td>
                    <select
                      value={i.airframeId}
                      disabled={!["ready", "needs-airframe", "needs-map"].includes(i.phase)}
                      aria-label={`airframe for ${i.file.name}`}
                      onChange={(e) =>
                        update(i.key, {
                          airframeId: e.target.value,
                          matchedBy: "chosen",
                          phase: e.target.value
                            ? i.canonical
                              ? "ready"
                              : "needs-map"
                            : "needs-airframe",
                        })
                      }
                    >
                      <option value="">— choose —</option>
                      {airframes.map((a) => (
                        <option key={a.id} value={a.id}>
                          {a.name}
                        </option>
                      ))}
                    </select>
                    <div className="muted small">{i.matchedBy}</div>
                  </td>
                  <td>
                    <div className="progress">
                      <div style={{ width: `${Math.round(i.uploadFraction * 100)}%` }} />
                    </div>
                  </td>
                  <td>
                    <div className="progress analyse">
                      <div style={{ width: `${Math.round(i.analysisFraction * 100)}%` }} />
                    </div>
                  </td>
                  <td
                    className={i.phase === "failed" ? "field-error" : undefined}
                    data-testid="upload-result"
                  >
                    {i.phase === "done" ? (
                      <strong>{i.message}</strong>
                    ) : (
                      i.message || i.phase.replace("-", " ")
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <div className="row" style={{ marginTop: "0.8rem" }}>
            <div>
              <button
                type="button"
                onClick={() => void importAll()}
                disabled={importable === 0}
                data-testid="import-all"
              >
                Import {importable} file{importable === 1 ? "" : "s"}
              </button>{" "}
              <button type="button" className="secondary" onClick={() => setItems([])}>
                Clear list
              </button>
            </div>
          </div>
        </section>
      ) : null}
    </div>
  );
}
