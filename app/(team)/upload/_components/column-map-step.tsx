"use client";

import { ColumnMapTable } from "./column-map-table";
import type { UploadItem } from "./upload-item";
import type { Uploads } from "./use-uploads";

export interface ColumnMapStepProps {
  uploads: Uploads;
  profiles: { name: string; mapText: string }[];
}

/** Step 3: for files not in heatcheck's own columns, which column is which (and an import profile). */
export function ColumnMapStep({ uploads, profiles }: ColumnMapStepProps) {
  if (uploads.pendingMaps.length === 0) return null;
  return (
    <section className="card space-above" data-testid="map-step">
      <h2>Which column is which</h2>
      <p className="muted small">
        These files do not use heatcheck&apos;s own column names. Check each field&apos;s column and
        unit; the last column shows the first rows as heatcheck will read them.
      </p>
      {uploads.pendingMaps.map((i) => (
        <FileColumnMap key={i.key} item={i} uploads={uploads} profiles={profiles} />
      ))}
      {uploads.profileNote ? (
        <p className="form-message" data-testid="profile-note">
          {uploads.profileNote}
        </p>
      ) : null}
    </section>
  );
}

interface FileColumnMapProps extends ColumnMapStepProps {
  item: UploadItem;
}

function FileColumnMap({ item, uploads, profiles }: FileColumnMapProps) {
  return (
    <div className="map-item">
      {item.guesses.length > 0 ? (
        <details className="small">
          <summary>What was guessed from the headers ({item.guesses.length})</summary>
          <ul>
            {item.guesses.map((g) => (
              <li key={g}>{g}</li>
            ))}
          </ul>
        </details>
      ) : null}
      <ColumnMapTable
        fileName={item.file.name}
        headers={item.headers}
        rows={item.rows}
        mapText={item.mapText}
        onChange={(mapText) => uploads.editMap(item.key, mapText)}
      />
      <div className="row">
        <details className="map-text">
          <summary className="small">
            The same map as text (for the command line and import profiles)
          </summary>
          <label>
            Map text
            <input
              value={item.mapText}
              onChange={(e) => uploads.setMapText(item.key, e.target.value)}
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
                uploads.setMapText(
                  item.key,
                  profiles.find((p) => p.name === e.target.value)?.mapText ?? item.mapText,
                )
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
      <div className="row align-end">
        <label>
          Save this map as a profile named
          <input
            value={uploads.profileName}
            onChange={(e) => uploads.setProfileName(e.target.value)}
            placeholder="logger model"
          />
        </label>
        <div>
          <button
            type="button"
            className="secondary"
            onClick={() => void uploads.saveProfile(item.mapText)}
          >
            Save profile
          </button>
        </div>
      </div>
    </div>
  );
}
