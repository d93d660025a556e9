import type { Status } from "@/lib/health/thresholds";

const GLYPH: Record<Status, string> = { ok: "✓", watch: "◐", inspect: "!", ground: "✕" };
const WORD: Record<Status, string> = {
  ok: "ok",
  watch: "watch",
  inspect: "inspect",
  ground: "ground",
};

export interface StatusBadgeProps {
  status: Status;
}

/** The health status as a word, a glyph and a pattern (never colour alone). */
export function StatusBadge({ status }: StatusBadgeProps) {
  return (
    <span className={`status ${status}`} data-status={status}>
      <span className="glyph" aria-hidden="true">
        {GLYPH[status]}
      </span>
      {WORD[status]}
    </span>
  );
}
