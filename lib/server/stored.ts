import "server-only";
import { z } from "zod";
import { ANALYSIS_VERSION, type LogAnalysis } from "@/lib/analysis/types";
import { BASELINE_VERSION, type Baseline } from "@/lib/health/baseline";
import type { Finding, NotCompared } from "@/lib/health/compare";
import { STATUS_ORDER, type Status } from "@/lib/health/thresholds";
import { StoredRecordError } from "@/lib/errors";
import { AXES } from "@/lib/logs/columns";

/**
 * The one place that reads what the database keeps as JSON text or as a string enum: crash
 * positions, assessment statuses, findings and what could not be compared, analyses and baselines.
 * Every reader of those columns goes through here, so a row this version cannot read fails with
 * one StoredRecordError that names the record, never with a wrong value further on.
 *
 * Analyses and baselines are the analyser's and the baseline builder's own output, written by this
 * server; their `version` says which fields exist (lib/analysis/types.ts, lib/health/baseline.ts:
 * every field added in 2 is optional, so 1 and 2 both decode). Their large numeric arrays are not
 * re-checked element by element here (they are read on every queue computation); the version and
 * the top-level shape are.
 */

const statusSchema = z.enum(STATUS_ORDER);

const findingSchema = z.object({
  axis: z.enum(AXES),
  kind: z.enum(["mode-shift", "mode-lost", "new-peak", "band-rise", "floor-rise", "motor-order"]),
  freqHz: z.number(),
  baselineFreqHz: z.number().optional(),
  deltaDb: z.number().optional(),
  shiftPct: z.number().optional(),
  motor: z.number().optional(),
  order: z.number().optional(),
  orders: z.array(z.number()).optional(),
  cause: z.enum(["prop", "motor-mount", "frame"]).optional(),
  severity: z.enum(["watch", "inspect", "ground"]),
  points: z.number(),
  text: z.string(),
}) satisfies z.ZodType<Finding>;

const notComparedSchema = z.object({
  what: z.string(),
  reason: z.string(),
}) satisfies z.ZodType<NotCompared>;

const positionsSchema = z.array(z.string());

function versioned(latest: number) {
  return z.looseObject({ version: z.number().int().min(1).max(latest) });
}
const analysisHead = versioned(ANALYSIS_VERSION).extend({
  sampleRateHz: z.number(),
  durationS: z.number(),
});
const baselineHead = versioned(BASELINE_VERSION).extend({ logs: z.number(), binHz: z.number() });

function decode<T>(schema: z.ZodType<T>, json: string, what: string): T {
  let value: unknown;
  try {
    value = JSON.parse(json);
  } catch {
    throw new StoredRecordError(what);
  }
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw new StoredRecordError(what);
  return parsed.data;
}

/** An assessment's health status (ok | watch | inspect | ground). */
export function decodeStatus(status: string): Status {
  const parsed = statusSchema.safeParse(status);
  if (!parsed.success) throw new StoredRecordError("An assessment's status");
  return parsed.data;
}

export function decodeFindings(json: string): Finding[] {
  return decode(z.array(findingSchema), json, "An assessment's findings");
}

export function decodeNotCompared(json: string): NotCompared[] {
  return decode(z.array(notComparedSchema), json, "An assessment's list of what was not compared");
}

/** A stored assessment's columns, decoded. */
export function decodeAssessment(row: {
  score: number | null;
  status: string;
  findings: string;
  notCompared: string;
}): { score: number | null; status: Status; findings: Finding[]; notCompared: NotCompared[] } {
  return {
    score: row.score,
    status: decodeStatus(row.status),
    findings: decodeFindings(row.findings),
    notCompared: decodeNotCompared(row.notCompared),
  };
}

/** The parts of the airframe a crash hit, as the crash form listed them. */
export function decodeCrashPositions(json: string): string[] {
  return decode(positionsSchema, json, "A crash's positions");
}

export function encodeCrashPositions(positions: readonly string[]): string {
  return JSON.stringify(positionsSchema.parse(positions));
}

/** A stored analysis (Analysis.json) of version 1 to ANALYSIS_VERSION. */
export function decodeAnalysis(json: string): LogAnalysis {
  // The head is checked; the rest is the analyser's own output of that version (see above).
  return decode(analysisHead, json, "A log's stored analysis") as unknown as LogAnalysis;
}

/** A stored baseline (Baseline.json) of version 1 to BASELINE_VERSION. */
export function decodeBaseline(json: string): Baseline {
  return decode(baselineHead, json, "A stored baseline") as unknown as Baseline;
}
