"use client";

import { useState, type DragEvent } from "react";

export interface FileChooserProps {
  onFiles: (files: File[]) => void;
}

/** Step 1: files or a whole folder, dropped or chosen. */
export function FileChooser({ onFiles }: FileChooserProps) {
  const [over, setOver] = useState(false);
  function onDrop(e: DragEvent<HTMLDivElement>) {
    e.preventDefault();
    setOver(false);
    onFiles(Array.from(e.dataTransfer.files));
  }
  return (
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
      <div className="row">
        <label className="inline">
          Files{" "}
          <input
            type="file"
            multiple
            accept=".csv,.txt"
            data-testid="file-input"
            onChange={(e) => onFiles(Array.from(e.target.files ?? []))}
          />
        </label>
        <label className="inline">
          Folder{" "}
          <input
            type="file"
            multiple
            ref={(el) => {
              // Not a React prop: set on the element so the picker chooses a folder.
              if (el) el.setAttribute("webkitdirectory", "");
            }}
            onChange={(e) => onFiles(Array.from(e.target.files ?? []))}
          />
        </label>
      </div>
    </div>
  );
}
