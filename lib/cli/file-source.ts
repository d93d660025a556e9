import { createReadStream } from "node:fs";
import { stat } from "node:fs/promises";
import { resolve } from "node:path";
import { config } from "../config";
import { InputError } from "../errors";

/**
 * A path as the user typed it: `npm run` moves into the project folder, so relative paths are
 * resolved against the folder npm was started from (INIT_CWD), as the user expects.
 */
export function userPath(path: string): string {
  return resolve(config().invocationDir, path);
}

/** A file as a byte stream in 1 MiB chunks; a missing or unreadable file is an InputError. */
export async function fileSource(typed: string): Promise<AsyncIterable<Uint8Array>> {
  const path = userPath(typed);
  try {
    const s = await stat(path);
    if (!s.isFile()) throw new InputError(`${typed} is not a file`);
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(
      `cannot read ${typed}: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}`,
    );
  }
  return createReadStream(path, { highWaterMark: 1 << 20 });
}
