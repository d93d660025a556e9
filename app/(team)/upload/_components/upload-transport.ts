import type { UploadItem } from "./upload-item";
import { scoreText } from "@/lib/view/score-text";

/** What the upload API answered, or why there is no answer. */
export type SendResult =
  | { ok: true; logId: string; duplicate: boolean; airframe?: string }
  | { ok: false; message: string; retryAfterS?: number };

interface UploadAnswer {
  logId?: string;
  error?: string;
  duplicate?: boolean;
  airframe?: string;
}

/**
 * Sends one file to POST /api/v1/logs. XMLHttpRequest rather than fetch, because only it reports
 * upload progress (`onProgress` gets the fraction sent, 0..1).
 */
export function sendLog(
  item: UploadItem,
  onProgress: (fraction: number) => void,
): Promise<SendResult> {
  return new Promise((resolve) => {
    const form = new FormData();
    form.append("airframeId", item.airframeId);
    if (!item.canonical && item.mapText) form.append("mapText", item.mapText);
    form.append("file", item.file, item.file.name);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", "/api/v1/logs");
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => {
      let body: UploadAnswer = {};
      try {
        body = JSON.parse(xhr.responseText) as UploadAnswer;
      } catch {
        body = { error: `the server answered ${xhr.status}` };
      }
      if (xhr.status >= 200 && xhr.status < 300 && body.logId)
        resolve({
          ok: true,
          logId: body.logId,
          duplicate: body.duplicate ?? false,
          airframe: body.airframe,
        });
      else {
        // 503 (server busy) and 429 (too many at once) come with Retry-After: worth a retry.
        const retryAfter = Number(xhr.getResponseHeader("Retry-After"));
        resolve({
          ok: false,
          message: body.error ?? `upload failed (${xhr.status})`,
          ...((xhr.status === 503 || xhr.status === 429) && retryAfter > 0
            ? { retryAfterS: retryAfter }
            : {}),
        });
      }
    };
    xhr.onerror = () =>
      resolve({
        ok: false,
        message: "the connection dropped during the upload; nothing was kept, try again",
      });
    xhr.send(form);
  });
}

/** How an analysis ended: the verdict line, or the analyser's error. */
export type AnalysisResult = { ok: true; message: string } | { ok: false; message: string };

interface LogState {
  status: string;
  progress: number;
  error: string | null;
  verdict: { score: number | null; status: string } | null;
}

const POLL_MS = 800;

/** Asks GET /api/v1/logs/:id until the analysis is over; `onProgress` gets its fraction, 0..1. */
export async function awaitAnalysis(
  logId: string,
  onProgress: (fraction: number) => void,
): Promise<AnalysisResult> {
  for (;;) {
    await new Promise((r) => setTimeout(r, POLL_MS));
    const res = await fetch(`/api/v1/logs/${logId}`, { cache: "no-store" });
    if (!res.ok) continue;
    const s = (await res.json()) as LogState;
    if (s.status === "pending") {
      onProgress(s.progress);
      continue;
    }
    if (s.status === "failed") return { ok: false, message: s.error ?? "analysis failed" };
    return {
      ok: true,
      message: s.verdict
        ? `${s.verdict.status.toUpperCase()} · score ${scoreText(s.verdict.score)}`
        : "analysed (no baseline yet to compare with)",
    };
  }
}
