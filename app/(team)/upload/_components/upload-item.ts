import { formatColumnMap, proposeColumnMap } from "@/lib/logs/columns";
import { draftOf, draftToMap, previewRows } from "@/lib/logs/map-preview";
import { matchAirframe, sniffLogHead } from "@/lib/logs/sniff";

/**
 * Where one file stands in the upload: read and matched (`ready`), waiting for an airframe or a
 * column map, on the wire, being analysed, and the end states.
 */
export type Phase =
  | "ready"
  | "needs-airframe"
  | "needs-map"
  | "uploading"
  | "analysing"
  | "done"
  | "failed"
  | "skipped";

export interface UploadItem {
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

export interface AirframeChoice {
  id: string;
  name: string;
}

// As far into a file as the reader looks for the header row (it must start within 4 MiB, and a
// line may be 1 MiB long: lib/logs/preamble.ts), so that long metadata reads the same here as on
// the server and the header line is never cut.
const HEAD_BYTES = 5 * 1024 * 1024;

/** True when a map text binds every needed field, once each. */
export function mapComplete(mapText: string): boolean {
  return mapText !== "" && draftToMap(draftOf(mapText)).problem === null;
}

/** A file that can go now: matched, and either in heatcheck's own columns or with a full map. */
export function importable(item: UploadItem): boolean {
  return item.phase === "ready" || (item.phase === "needs-map" && mapComplete(item.mapText));
}

/** The airframe may still be changed until the file is sent. */
export function airframeEditable(item: UploadItem): boolean {
  return ["ready", "needs-airframe", "needs-map"].includes(item.phase);
}

/** The phase after a person picks an airframe (or clears the choice). */
export function phaseForAirframe(item: UploadItem, airframeId: string): Phase {
  if (!airframeId) return "needs-airframe";
  return item.canonical ? "ready" : "needs-map";
}

/**
 * The metadata step: reads a file's head in the browser with the server's own reader rules,
 * matches it to an airframe and proposes a column map when the headers are not heatcheck's own.
 */
export async function readItem(file: File, airframes: AirframeChoice[]): Promise<UploadItem> {
  const key = `${file.name}-${file.size}-${file.lastModified}-${Math.random()}`;
  if (!/\.(csv|txt)$/i.test(file.name))
    return {
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
    };
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
  return {
    key,
    file,
    airframeId,
    matchedBy: match ? `matched by ${match.how}` : "no match: choose",
    canonical,
    mapText,
    headers: head?.headers ?? [],
    rows,
    guesses: proposal?.guesses ?? [],
    phase: !head ? "failed" : !airframeId ? "needs-airframe" : canonical ? "ready" : "needs-map",
    uploadFraction: 0,
    analysisFraction: 0,
    message: !head
      ? "no header row found: not a CSV flight log"
      : proposal && proposal.missing.length > 0
        ? `no column for ${proposal.missing.join(", ")}: give a map`
        : "",
  };
}
