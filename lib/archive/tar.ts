import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import type { Writable } from "node:stream";

/**
 * Streaming reader and writer for POSIX ustar archives (IEEE Std 1003.1-1988, the `ustar`
 * interchange format that every `tar` reads). Only regular files and folders, names up to 255
 * bytes (prefix + name split), sizes up to 8 GiB (11 octal digits). Files are streamed, never held
 * whole in memory; gzip is left to the caller (node:zlib).
 */

const BLOCK = 512;

export interface TarEntry {
  /** Path inside the archive, forward slashes, never absolute, no `..`. */
  name: string;
  type: "file" | "directory";
  size: number;
  mode: number;
  mtime: Date;
}

/** Refuses names that could land outside the folder they are extracted into. */
export function safeEntryName(name: string): string {
  const clean = name
    .replace(/\\/g, "/")
    .replace(/^\.\/+/, "")
    .replace(/\/+$/, "");
  if (
    clean === "" ||
    clean.startsWith("/") ||
    /^[A-Za-z]:/.test(clean) ||
    clean.split("/").some((p) => p === ".." || p === "")
  ) {
    throw new Error(`the archive holds an unsafe path: ${JSON.stringify(name)}`);
  }
  return clean;
}

function octal(value: number, width: number): string {
  const s = Math.floor(value).toString(8);
  if (s.length > width - 1)
    throw new Error(`value ${value} does not fit a ${width}-byte tar field`);
  return s.padStart(width - 1, "0") + "\0";
}

function header(entry: TarEntry): Buffer {
  const h = Buffer.alloc(BLOCK, 0);
  let name = safeEntryName(entry.name) + (entry.type === "directory" ? "/" : "");
  let prefix = "";
  if (Buffer.byteLength(name) > 100) {
    const cut = name.lastIndexOf("/", name.length - 2);
    prefix = name.slice(0, cut);
    name = name.slice(cut + 1);
    if (cut < 0 || Buffer.byteLength(name) > 100 || Buffer.byteLength(prefix) > 155)
      throw new Error(`name too long for ustar: ${entry.name}`);
  }
  h.write(name, 0, 100, "utf8");
  h.write(octal(entry.mode & 0o7777, 8), 100, 8, "ascii");
  h.write(octal(0, 8), 108, 8, "ascii");
  h.write(octal(0, 8), 116, 8, "ascii");
  h.write(octal(entry.type === "file" ? entry.size : 0, 12), 124, 12, "ascii");
  h.write(octal(entry.mtime.getTime() / 1000, 12), 136, 12, "ascii");
  h.write("        ", 148, 8, "ascii");
  h.write(entry.type === "file" ? "0" : "5", 156, 1, "ascii");
  h.write("ustar\0", 257, 6, "ascii");
  h.write("00", 263, 2, "ascii");
  h.write(prefix, 345, 155, "utf8");
  let sum = 0;
  for (const b of h) sum += b;
  h.write(octal(sum, 7) + " ", 148, 8, "ascii");
  return h;
}

async function put(out: Writable, chunk: Uint8Array): Promise<void> {
  if (!out.write(chunk)) {
    await new Promise<void>((resolve, reject) => {
      const onError = (e: Error) => reject(e);
      out.once("error", onError);
      out.once("drain", () => {
        out.off("error", onError);
        resolve();
      });
    });
  }
}

/** Writes entries to a stream (a gzip stream, a file). Call `end()` to write the two zero blocks. */
export class TarWriter {
  constructor(private readonly out: Writable) {}

  async directory(name: string, mode = 0o700): Promise<void> {
    await put(this.out, header({ name, type: "directory", size: 0, mode, mtime: new Date() }));
  }

  async bytes(name: string, data: Uint8Array | string, mode = 0o600): Promise<void> {
    const buf = typeof data === "string" ? Buffer.from(data, "utf8") : data;
    await put(this.out, header({ name, type: "file", size: buf.length, mode, mtime: new Date() }));
    await put(this.out, buf);
    await this.pad(buf.length);
  }

  /** Streams a file from disk; its size is taken once, and exactly that many bytes are written. */
  async file(name: string, path: string, mode = 0o600): Promise<void> {
    const s = await stat(path);
    await put(this.out, header({ name, type: "file", size: s.size, mode, mtime: s.mtime }));
    let written = 0;
    for await (const chunk of createReadStream(path, {
      highWaterMark: 1 << 20,
      end: s.size > 0 ? s.size - 1 : 0,
    })) {
      const c = chunk as Buffer;
      const take = Math.min(c.length, s.size - written);
      if (take <= 0) break;
      await put(this.out, take === c.length ? c : c.subarray(0, take));
      written += take;
    }
    if (written !== s.size) throw new Error(`${path} changed size while it was archived`);
    await this.pad(s.size);
  }

  private async pad(size: number): Promise<void> {
    const rest = size % BLOCK;
    if (rest > 0) await put(this.out, Buffer.alloc(BLOCK - rest, 0));
  }

  async end(): Promise<void> {
    await put(this.out, Buffer.alloc(BLOCK * 2, 0));
    await new Promise<void>((resolve, reject) => {
      this.out.once("error", reject);
      this.out.end(() => resolve());
    });
  }
}

function field(h: Buffer, at: number, len: number): string {
  const raw = h.subarray(at, at + len);
  const nul = raw.indexOf(0);
  return raw.subarray(0, nul < 0 ? len : nul).toString("utf8");
}

function parseHeader(h: Buffer): TarEntry | null {
  if (h.every((b) => b === 0)) return null;
  let sum = 0;
  for (let i = 0; i < BLOCK; i++) sum += i >= 148 && i < 156 ? 32 : (h[i] ?? 0);
  const stored = parseInt(field(h, 148, 8).trim(), 8);
  if (stored !== sum) throw new Error("the archive is damaged (a header checksum does not match)");
  const prefix = field(h, 345, 155);
  const base = field(h, 0, 100);
  const typeFlag = String.fromCharCode(h[156] ?? 48);
  const type =
    typeFlag === "5" ? "directory" : typeFlag === "0" || typeFlag === "\0" ? "file" : null;
  if (!type)
    throw new Error(
      `the archive holds an entry of a kind heatcheck does not restore (type ${JSON.stringify(typeFlag)}: ${base})`,
    );
  return {
    name: safeEntryName(prefix ? `${prefix}/${base}` : base),
    type,
    size: parseInt(field(h, 124, 12).trim() || "0", 8),
    mode: parseInt(field(h, 100, 8).trim() || "600", 8),
    mtime: new Date(parseInt(field(h, 136, 12).trim() || "0", 8) * 1000),
  };
}

/**
 * Reads an archive from a byte stream. For each entry `onEntry` gets its header and, for a file,
 * an async iterable of its bytes that must be consumed before the next entry is read.
 */
export async function readTar(
  source: AsyncIterable<Uint8Array>,
  onEntry: (entry: TarEntry, body: AsyncIterable<Uint8Array>) => Promise<void>,
): Promise<number> {
  const it = source[Symbol.asyncIterator]();
  let buf: Buffer = Buffer.alloc(0);
  let ended = false;
  const fill = async (n: number): Promise<boolean> => {
    while (buf.length < n && !ended) {
      const next = await it.next();
      if (next.done) ended = true;
      else buf = buf.length === 0 ? Buffer.from(next.value) : Buffer.concat([buf, next.value]);
    }
    return buf.length >= n;
  };
  let count = 0;
  for (;;) {
    if (!(await fill(BLOCK))) throw new Error("the archive ends in the middle (no end marker)");
    const entry = parseHeader(buf.subarray(0, BLOCK));
    buf = buf.subarray(BLOCK);
    if (!entry) return count;
    count++;
    let left = entry.type === "file" ? entry.size : 0;
    async function* body(): AsyncGenerator<Uint8Array> {
      while (left > 0) {
        if (buf.length === 0 && !(await fill(1)))
          throw new Error(`the archive ends in the middle of ${entry?.name ?? "a file"}`);
        const take = Math.min(left, buf.length);
        const piece = buf.subarray(0, take);
        buf = buf.subarray(take);
        left -= take;
        yield piece;
      }
    }
    await onEntry(entry, body());
    // Whatever the consumer left unread is skipped, then the padding.
    for await (const _ of body()) void _;
    const padded = entry.type === "file" ? (BLOCK - (entry.size % BLOCK)) % BLOCK : 0;
    if (padded > 0) {
      if (!(await fill(padded))) throw new Error("the archive ends in the middle");
      buf = buf.subarray(padded);
    }
  }
}

/** Writes an entry's bytes to a new file (never over an existing one) with the given mode. */
export async function writeEntryFile(
  path: string,
  body: AsyncIterable<Uint8Array>,
  mode: number,
): Promise<number> {
  const fh = await open(path, "wx", mode);
  let n = 0;
  try {
    for await (const chunk of body) {
      await fh.write(chunk);
      n += chunk.length;
    }
    await fh.sync();
  } finally {
    await fh.close();
  }
  return n;
}
