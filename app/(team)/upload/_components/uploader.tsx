"use client";

import { ColumnMapStep } from "./column-map-step";
import { FileChooser } from "./file-chooser";
import { UploadList } from "./upload-list";
import type { AirframeChoice } from "./upload-item";
import { useUploads } from "./use-uploads";

export interface UploaderProps {
  airframes: AirframeChoice[];
  profiles: { name: string; mapText: string }[];
}

/** The upload screen: choose files, check their airframe and column map, import, read the verdicts. */
export function Uploader({ airframes, profiles }: UploaderProps) {
  const uploads = useUploads(airframes);
  return (
    <div data-testid="uploader">
      <FileChooser onFiles={(files) => void uploads.add(files)} />
      <ColumnMapStep uploads={uploads} profiles={profiles} />
      <UploadList uploads={uploads} airframes={airframes} />
    </div>
  );
}
