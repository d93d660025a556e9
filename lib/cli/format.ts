import { throttleBandLabel } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import type { Assessment } from "../health/compare";
import { DECISION_AID_NOTE } from "../health/safety";
import { AXES } from "../logs/columns";

/** Human-readable CLI output: aligned plain-text tables, no colour codes (they end up in files). */

export function table(
  headers: string[],
  rows: (string | number)[][],
  rightAligned: boolean[] = [],
): string {
  const cells = [headers, ...rows.map((r) => r.map(String))];
  const widths = headers.map((_, c) => Math.max(...cells.map((r) => (r[c] ?? "").length)));
  return cells
    .map((r) =>
      r
        .map((cell, c) =>
          rightAligned[c] ? cell.padStart(widths[c] ?? 0) : cell.padEnd(widths[c] ?? 0),
        )
        .join("  ")
        .trimEnd(),
    )
    .map((line) => `  ${line}`)
    .join("\n");
}

const n1 = (v: number) => (Number.isFinite(v) ? v.toFixed(1) : "–");
const n2 = (v: number) => (Number.isFinite(v) ? v.toFixed(2) : "–");

/** `gapCount` counts every gap (the analysis lists only the first ones); default: the listed ones. */
export function formatAnalysis(file: string, a: LogAnalysis, gapCount = a.gaps.length): string {
  const out: string[] = [];
  const meta = a.metadata;
  out.push(`${file}`);
  const who = [
    meta.airframe ? `airframe ${meta.airframe}` : "",
    meta.flown_at ? `flown ${meta.flown_at}` : "",
  ]
    .filter(Boolean)
    .join(" · ");
  if (who) out.push(`  ${who}`);
  out.push(
    `  ${Math.round(a.sampleRateHz)} Hz · ${a.durationS.toFixed(1)} s · ${a.samples} samples · ${gapCount} gap${gapCount === 1 ? "" : "s"} · ${a.droppedRows} dropped row${a.droppedRows === 1 ? "" : "s"}`,
  );
  const s = a.settings;
  out.push(
    `  Welch PSD: ${s.window} window, ${s.nperseg}-sample segments (${s.binHz.toFixed(2)} Hz bins), ${Math.round((s.noverlap / s.nperseg) * 100)} % overlap, ${s.average} of ${a.segments} segments`,
  );
  for (const g of a.guesses) out.push(`  guessed: ${g}`);
  for (const gap of a.gaps.slice(0, 5))
    out.push(
      `  gap of ${(gap.lengthS * 1000).toFixed(1)} ms at ${gap.atS.toFixed(3)} s (line ${gap.line})`,
    );
  out.push("");
  out.push(
    `Peaks (prominence ≥ 6 dB, ${s.minFreqHz}–${Math.round(s.maxFreqHz)} Hz; dB re 1 (deg/s)²/Hz)`,
  );
  const peakRows = AXES.flatMap((axis) =>
    a.axes[axis].peaks.map((p) => [
      axis,
      n1(p.freqHz),
      n1(p.levelDb),
      n1(p.prominenceDb),
      n1(p.widthHz),
      p.kind,
    ]),
  );
  out.push(
    peakRows.length > 0
      ? table(["axis", "Hz", "level", "prominence", "width Hz", "kind"], peakRows, [
          false,
          true,
          true,
          true,
          true,
          false,
        ])
      : "  none",
  );
  out.push("");
  out.push("Vibration by band (deg/s rms)");
  out.push(
    table(
      ["band Hz", ...AXES],
      a.bands.map((b, i) => [
        `${b.loHz}–${b.hiHz}`,
        ...AXES.map((axis) => n2(Math.sqrt(a.axes[axis].bandPower[i] ?? 0))),
      ]),
      [false, true, true, true],
    ),
  );
  out.push(
    `  noise floor above ${Math.round(s.floorCornerHz)} Hz, dB: ${AXES.map((axis) => `${axis} ${n1(a.axes[axis].floorDb)}`).join(" · ")}`,
  );
  out.push("");
  out.push("Time by throttle");
  const used = a.throttleBands.filter((b) => b.seconds > 0);
  out.push(
    table(
      ["throttle", "seconds", "segments", "mean"],
      used.map((b) => [
        throttleBandLabel(b.lo, b.hi),
        n1(b.seconds),
        b.segments,
        n2(b.meanThrottle),
      ]),
      [false, true, true, true],
    ),
  );
  if (a.motors.length > 0) {
    out.push("");
    out.push("Motors");
    out.push(
      table(
        ["motor", "mean rpm", "1× Hz", `${s.bladeCount}× Hz (blade pass)`],
        a.motors.map((m) => [
          m.motor,
          Math.round(m.meanRpm),
          n1(m.meanRpm / 60),
          n1((m.meanRpm / 60) * s.bladeCount),
        ]),
        [false, true, true, true],
      ),
    );
  }
  return out.join("\n") + "\n";
}

export function formatAssessment(file: string, a: Assessment): string {
  const out: string[] = [];
  out.push(`${file} against its baseline`);
  out.push(
    Number.isFinite(a.score)
      ? `  score ${a.score} / 100 · ${a.status}`
      : `  no score · ${a.status}: nothing could be compared`,
  );
  out.push("");
  if (a.findings.length === 0) {
    out.push("  No change from the baseline beyond the watch thresholds.");
  } else {
    out.push("What took points off");
    for (const f of a.findings)
      out.push(`  −${f.points.toFixed(0).padStart(2)}  [${f.severity}] ${f.text}`);
  }
  if (a.comparedBands.length > 0)
    out.push(`\n  compared at throttle ${a.comparedBands.join(", ")}`);
  if (a.notCompared.length > 0) {
    out.push("");
    out.push("Not compared");
    for (const n of a.notCompared) out.push(`  ${n.what}: ${n.reason}`);
  }
  out.push("");
  out.push(`  ${DECISION_AID_NOTE}`);
  return out.join("\n") + "\n";
}
