// Messages between the server and the upload-check worker thread. Several uploads share the one
// thread, each under its own id; every chunk is acknowledged once the reader has taken it, which
// is the server's back-pressure.
import type { ReadSummary } from "../logs/types";
import type { UploadCheckOptions } from "./upload-check";

export type ToChecker =
  | { type: "start"; id: number; options: UploadCheckOptions }
  | { type: "chunk"; id: number; bytes: Uint8Array }
  | { type: "end"; id: number }
  | { type: "abort"; id: number };

/** How a refusal crosses the thread boundary: its kind picks the error class on the other side. */
export type CheckFailureKind = "format" | "limit" | "other";

export type FromChecker =
  | { type: "ack"; id: number }
  | { type: "passed"; id: number; summary: ReadSummary }
  | { type: "refused"; id: number; kind: CheckFailureKind; message: string };
