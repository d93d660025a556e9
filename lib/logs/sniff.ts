import { canonicalMap, proposeColumnMap, type MapProposal } from "./columns";

/**
 * What the first few kilobytes of a log say: its # metadata and its header. Used before an import
 * (in the browser and on the server) to match the file to an airframe and to check its columns.
 */
export interface LogHead {
  metadata: Record<string, string>;
  headers: string[];
  /** The proposal for these headers (empty guesses for canonical files). */
  proposal: MapProposal;
  canonical: boolean;
}

export function sniffLogHead(text: string): LogHead | null {
  const metadata: Record<string, string> = {};
  for (const rawLine of text.replace(/^\uFEFF/, "").split(/\r?\n/)) {
    const line = rawLine.trim();
    if (line === "") continue;
    if (line.startsWith("#")) {
      const m = /^#\s*([A-Za-z0-9_.-]+)\s*:\s*(.*)$/.exec(line);
      if (m?.[1] !== undefined) metadata[m[1].toLowerCase()] = (m[2] ?? "").trim();
      continue;
    }
    const headers = line.split(",").map((h) => h.trim().replace(/^"(.*)"$/, "$1"));
    return { metadata, headers, proposal: proposeColumnMap(headers), canonical: canonicalMap(headers) !== undefined };
  }
  return null;
}

/**
 * The airframe a log belongs to: its `# airframe:` metadata when that names a known airframe,
 * else the longest known name found in the file name. Case is ignored.
 */
export function matchAirframe(
  names: readonly string[],
  clues: { metadataAirframe?: string; fileName?: string },
): { name: string; how: "metadata" | "file name" } | null {
  const meta = clues.metadataAirframe?.trim().toLowerCase();
  if (meta) {
    const exact = names.find((n) => n.toLowerCase() === meta);
    if (exact) return { name: exact, how: "metadata" };
  }
  const file = (clues.fileName ?? "").toLowerCase().replace(/[_\s]+/g, "-");
  const inName = [...names]
    .sort((a, b) => b.length - a.length)
    .find((n) => file.includes(n.toLowerCase().replace(/[_\s]+/g, "-")));
  return inName ? { name: inName, how: "file name" } : null;
}
