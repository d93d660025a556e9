"use client";

import { airframeEditable, type AirframeChoice, type UploadItem } from "./upload-item";
import type { Uploads } from "./use-uploads";

export interface UploadListProps {
  uploads: Uploads;
  airframes: AirframeChoice[];
}

/** Every chosen file with its airframe (step 2), its two progress bars (4, 5) and its verdict (6). */
export function UploadList({ uploads, airframes }: UploadListProps) {
  if (uploads.items.length === 0) return null;
  const count = uploads.importableCount;
  return (
    <section className="card space-above">
      <table className="upload-table" data-testid="upload-list">
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
          {uploads.items.map((i) => (
            <tr key={i.key} data-file={i.file.name} data-phase={i.phase}>
              <td data-label="file">
                {i.file.name}
                <div className="muted small">{(i.file.size / 1e6).toFixed(1)} MB</div>
              </td>
              <td data-label="airframe">
                <AirframeChoiceCell item={i} airframes={airframes} uploads={uploads} />
              </td>
              <td data-label="upload">
                <ProgressBar fraction={i.uploadFraction} label={`upload of ${i.file.name}`} />
              </td>
              <td data-label="analysis">
                <ProgressBar
                  fraction={i.analysisFraction}
                  label={`analysis of ${i.file.name}`}
                  analysis
                />
              </td>
              <Verdict item={i} />
            </tr>
          ))}
        </tbody>
      </table>
      <div className="row upload-actions">
        <div>
          <button
            type="button"
            onClick={() => void uploads.importAll()}
            disabled={count === 0}
            data-testid="import-all"
          >
            Import {count} file{count === 1 ? "" : "s"}
          </button>{" "}
          <button type="button" className="secondary" onClick={uploads.clear}>
            Clear list
          </button>
        </div>
      </div>
    </section>
  );
}

interface ItemCellProps {
  item: UploadItem;
  airframes: AirframeChoice[];
  uploads: Uploads;
}

/** Step 2: the airframe the file's metadata or name matched, open to change until it is sent. */
function AirframeChoiceCell({ item, airframes, uploads }: ItemCellProps) {
  return (
    <>
      <select
        value={item.airframeId}
        disabled={!airframeEditable(item)}
        aria-label={`airframe for ${item.file.name}`}
        onChange={(e) => uploads.chooseAirframe(item.key, e.target.value)}
      >
        <option value="">— choose —</option>
        {airframes.map((a) => (
          <option key={a.id} value={a.id}>
            {a.name}
          </option>
        ))}
      </select>
      <div className="muted small">{item.matchedBy}</div>
    </>
  );
}

interface ProgressBarProps {
  fraction: number;
  label: string;
  analysis?: boolean;
}

/** Steps 4 and 5: how much is sent, how much is analysed. */
function ProgressBar({ fraction, label, analysis = false }: ProgressBarProps) {
  const percent = Math.round(fraction * 100);
  return (
    <div
      className={analysis ? "progress analyse" : "progress"}
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={percent}
    >
      {/* The bar's length is the data itself. */}
      <div style={{ width: `${percent}%` }} />
    </div>
  );
}

/** Step 6: the verdict, or where the file stands, or why it failed. */
function Verdict({ item }: { item: UploadItem }) {
  return (
    <td
      className={item.phase === "failed" ? "field-error" : undefined}
      data-testid="upload-result"
      data-label="result"
    >
      {item.phase === "done" ? (
        <strong>{item.message}</strong>
      ) : (
        item.message || item.phase.replace("-", " ")
      )}
    </td>
  );
}
