import { canonicalMap, proposeColumnMap, type MapProposal } from "./columns";
import { LogReader, nextChunk, type LogSink } from "./read-log";

/**
 * What the head of a log says: its # metadata and its header. Used before an import (in the browser
 * and on the server) to match the file to an airframe and to check its columns. It is read by the
 * log reader itself in head mode, so the rules are the reader's: what kind of file it is, line
 * endings, the line-length limit and how far in the header may start (lib/logs/preamble.ts).
 */
export interface LogHead {
  metadata: Record<string, string>;
  headers: string[];
  /** 1-based line of the header row. */
  line: number;
  /** The proposal for these headers (empty guesses for canonical files). */
  proposal: MapProposal;
  canonical: boolean;
}

const NO_ROWS: LogSink = { begin: () => undefined, block: () => undefined, gap: () => undefined };

/**
 * Reads a log's head from a byte stream and stops at the header row (the rest of the stream is not
 * read; the iterator is closed). Throws LogFormatError with the reader's sentence when there is no
 * header (an empty file, only metadata, a compressed, binary or UTF-16 file, a line over the limit,
 * no header within the first 4 MiB) and LimitExceededError over `maxBytes`.
 */
export async function readLogHead(
  source: AsyncIterable<Uint8Array>,
  options: { maxBytes?: number } = {},
): Promise<LogHead> {
  const reader = new LogReader(NO_ROWS, options, true);
  const chunks = source[Symbol.asyncIterator]();
  try {
    for (;;) {
      const next = await nextChunk(chunks);
      if (next.done) break;
      reader.push(next.value);
      if (reader.head) break;
    }
  } finally {
    await chunks.return?.();
  }
  return headOf(reader);
}

function headOf(reader: LogReader): LogHead {
  // At the end of the input this throws the reader's own sentence for a file without a header.
  const { metadata, headers, line } = reader.head ?? reader.finishHead();
  return {
    metadata,
    headers,
    line,
    proposal: proposeColumnMap(headers),
    canonical: canonicalMap(headers) !== undefined,
  };
}

/**
 * The head of a log from its first bytes as text (a slice of a file in the browser), or null when
 * the header row is not in this text or the text is not a readable log head.
 */
export function sniffLogHead(text: string): LogHead | null {
  const reader = new LogReader(NO_ROWS, {}, true);
  try {
    reader.push(new TextEncoder().encode(text));
    reader.settle();
    return reader.head ? headOf(reader) : null;
  } catch {
    return null;
  }
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
