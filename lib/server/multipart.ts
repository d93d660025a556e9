import "server-only";
import { Readable } from "node:stream";
import busboy from "busboy";
import { InputError } from "@/lib/errors";

export interface MultipartFile {
  fields: Record<string, string>;
  fileName: string;
  /** The file's bytes as they arrive; must be consumed. */
  body: AsyncIterable<Uint8Array>;
}

/**
 * Streams a multipart/form-data request: text fields sent before the `file` part are read, then
 * the file is handed over as a stream without being held in memory. Exactly one file part.
 */
export function readMultipartFile(request: Request, handle: (file: MultipartFile) => Promise<unknown>): Promise<unknown> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.toLowerCase().startsWith("multipart/form-data") || !request.body) {
    return Promise.reject(new InputError("Send the log as multipart/form-data with a part named file."));
  }
  return new Promise((resolve, reject) => {
    const fields: Record<string, string> = {};
    let handled: Promise<unknown> | null = null;
    let bb: busboy.Busboy;
    try {
      bb = busboy({ headers: { "content-type": type }, limits: { files: 1, fields: 20, fieldSize: 16 * 1024 } });
    } catch {
      reject(new InputError("The multipart body could not be read."));
      return;
    }
    bb.on("field", (name, value) => {
      fields[name] = value;
    });
    bb.on("file", (name, stream, info) => {
      if (name !== "file" || handled) {
        stream.resume();
        return;
      }
      handled = handle({ fields: { ...fields }, fileName: info.filename || "upload.csv", body: stream });
      handled.then(resolve, (e: unknown) => {
        stream.resume();
        reject(e);
      });
    });
    bb.on("error", () => reject(new InputError("The upload was cut off or is not valid multipart data.")));
    bb.on("close", () => {
      if (!handled) reject(new InputError("No part named file was sent."));
    });
    Readable.fromWeb(request.body as import("node:stream/web").ReadableStream).pipe(bb);
  });
}
