// Worker-thread entry for the upload check, bundled to generated/worker/upload-check-worker.mjs
// by scripts/build-bundles.ts. Reading a log is the heaviest work an upload does; here it runs
// beside the server's event loop, so pages and the queue are answered while logs stream in.
import { parentPort } from "node:worker_threads";
import { LimitExceededError, LogFormatError } from "../errors";
import { checkUpload } from "./upload-check";
import type { FromChecker, ToChecker } from "./upload-check-protocol";

/** The chunks of one upload as an async iterable, fed by messages. */
class Feed implements AsyncIterable<Uint8Array> {
  private readonly chunks: Uint8Array[] = [];
  private ended = false;
  private wake: (() => void) | null = null;

  push(bytes: Uint8Array): void {
    this.chunks.push(bytes);
    this.wake?.();
  }

  end(): void {
    this.ended = true;
    this.wake?.();
  }

  async *[Symbol.asyncIterator](): AsyncGenerator<Uint8Array> {
    for (;;) {
      const next = this.chunks.shift();
      if (next) {
        yield next;
        continue;
      }
      if (this.ended) return;
      await new Promise<void>((resolve) => (this.wake = resolve));
      this.wake = null;
    }
  }
}

const port = parentPort;
if (port) {
  const post = (m: FromChecker) => port.postMessage(m);
  const feeds = new Map<number, Feed>();
  port.on("message", (m: ToChecker) => {
    if (m.type === "start") {
      const feed = new Feed();
      feeds.set(m.id, feed);
      const id = m.id;
      // Each chunk is acknowledged when the reader asks for the next one.
      const acked: AsyncIterable<Uint8Array> = {
        async *[Symbol.asyncIterator]() {
          for await (const bytes of feed) {
            yield bytes;
            post({ type: "ack", id });
          }
        },
      };
      checkUpload(acked, m.options)
        .then((summary) => post({ type: "passed", id, summary }))
        .catch((e: unknown) =>
          post({
            type: "refused",
            id,
            kind:
              e instanceof LogFormatError
                ? "format"
                : e instanceof LimitExceededError
                  ? "limit"
                  : "other",
            message: e instanceof Error ? e.message : String(e),
          }),
        )
        .finally(() => feeds.delete(id));
    } else if (m.type === "chunk") {
      feeds.get(m.id)?.push(m.bytes);
    } else {
      // An aborted upload ends its feed; the reader then stops at what it has.
      feeds.get(m.id)?.end();
      if (m.type === "abort") feeds.delete(m.id);
    }
  });
}
