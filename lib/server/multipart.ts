import "server-only";
import { Readable } from "node:stream";
import type { ReadableStream as NodeWebStream } from "node:stream/web";
import busboy from "busboy";
import { InputError } from "@/lib/errors";

export interface MultipartFile {
  fields: Record<string, string>;
  fileName: string;
  /** The file's bytes as they arrive; must be consumed. Fails when the upload is cut off. */
  body: AsyncIterable<Uint8Array>;
}

/**
 * Streams a multipart/form-data request: text fields sent before the `file` part are read, then
 * the file is handed over as a stream without being held in memory. Exactly one file part.
 *
 * Every failure reaches `handle` through its body stream or ends this promise: a request cut off
 * mid-body destroys the file stream with an error (so the handler removes its temporary file), and
 * no stream is left without an error listener (a dropped client never becomes an uncaught
 * exception). When the handler refuses the file early, the rest of the body is read as raw bytes
 * and dropped before the answer goes out (for at most DRAIN_MS): a browser or a script still
 * sending would otherwise see a reset connection instead of the reason.
 */
const DRAIN_MS = 30_000;

export function readMultipartFile<T>(
  request: Request,
  handle: (file: MultipartFile) => Promise<T>,
): Promise<T> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.toLowerCase().startsWith("multipart/form-data") || !request.body) {
    return Promise.reject(
      new InputError("Send the log as multipart/form-data with a part named file."),
    );
  }
  const body = request.body;
  return new Promise<T>((resolve, reject) => {
    const fields: Record<string, string> = {};
    let handled: Promise<T> | null = null;
    let settled = false;
    const finish = (ok: boolean, value: unknown) => {
      if (settled) return;
      settled = true;
      if (ok) resolve(value as T);
      else reject(value instanceof Error ? value : new Error(String(value)));
    };
    let bb: busboy.Busboy;
    try {
      bb = busboy({
        headers: { "content-type": type },
        limits: { files: 1, fields: 20, fieldSize: 16 * 1024 },
      });
    } catch {
      finish(false, new InputError("The multipart body could not be read."));
      return;
    }
    const source = Readable.fromWeb(body as unknown as NodeWebStream<Uint8Array>);
    const drained = new Promise<void>((done) => {
      const timer = setTimeout(done, DRAIN_MS);
      const end = () => {
        clearTimeout(timer);
        done();
      };
      source.once("end", end);
      source.once("error", end);
      source.once("close", end);
    });
    const cutOff = () =>
      new InputError("The upload was cut off or is not valid multipart data; nothing was kept.");
    let fileStream: Readable | null = null;
    source.on("error", () => {
      // The client went away: fail the file stream so its consumer cleans up, and this request.
      fileStream?.destroy(cutOff());
      bb.destroy();
      if (!handled) finish(false, cutOff());
    });
    bb.on("field", (name, value) => {
      fields[name] = value;
    });
    bb.on("file", (name, stream, info) => {
      stream.on("error", () => undefined); // reported to the handler through its iterator
      if (name !== "file" || handled) {
        stream.resume();
        return;
      }
      fileStream = stream;
      // Not destroyed when the consumer stops early, so that the rest can be drained (see above).
      const bytes: AsyncIterable<Uint8Array> = {
        [Symbol.asyncIterator]: () => stream.iterator({ destroyOnReturn: false }),
      };
      handled = handle({
        fields: { ...fields },
        fileName: info.filename || "upload.csv",
        body: bytes,
      });
      handled.then(
        (v) => finish(true, v),
        (e: unknown) => {
          // Read and discard the rest as raw bytes, no longer parsed as multipart: a refused
          // upload (server busy, too many at once) should cost the server's thread next to
          // nothing. The file stream is ended for a consumer that still holds it.
          source.unpipe(bb);
          stream.removeAllListeners("readable");
          if (!stream.destroyed) stream.resume();
          source.resume();
          void drained.then(() => finish(false, e));
        },
      );
    });
    bb.on("error", () => {
      fileStream?.destroy(cutOff());
      if (!handled) finish(false, cutOff());
    });
    bb.on("close", () => {
      if (!handled) finish(false, new InputError("No part named file was sent."));
    });
    source.pipe(bb);
  });
}

/** How much of a refused request's unread body is read and dropped before answering. */
export const REFUSED_BODY_DRAIN_BYTES = 4 << 20;

/**
 * Reads and drops what is left of a request body nobody has started reading, up to `maxBytes` or
 * two seconds, whichever comes first. A body already being read (the multipart reader drains its
 * own) is left alone.
 */
export async function drainUnread(request: Request, maxBytes: number): Promise<void> {
  const body = request.body;
  if (!body || body.locked || request.bodyUsed) return;
  const reader = body.getReader();
  const deadline = Date.now() + 2000;
  let read = 0;
  try {
    while (read < maxBytes && Date.now() < deadline) {
      const next = await Promise.race([
        reader.read(),
        new Promise<null>((r) => setTimeout(() => r(null), Math.max(0, deadline - Date.now()))),
      ]);
      if (next === null || next.done) break;
      read += next.value.byteLength;
    }
  } catch {
    // The client went away: nothing to drain.
  } finally {
    try {
      reader.releaseLock();
    } catch {
      // A read still pending at the deadline: the connection is closed after the answer anyway.
    }
  }
}
