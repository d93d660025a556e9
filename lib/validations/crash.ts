import { z } from "zod";
import { dateTimeField, idField, optionalText, stringList } from "./common";

export const CRASH_SEVERITIES = ["minor", "hard", "destroyed"] as const;

export const crashSchema = z.object({
  airframeId: idField,
  at: dateTimeField,
  heatId: z
    .string()
    .trim()
    .optional()
    .transform((v) => (v ? v : null)),
  severity: z.enum(CRASH_SEVERITIES, { message: "Choose how hard the crash was." }),
  positions: stringList,
  note: optionalText(1000),
  ground: z
    .string()
    .optional()
    .transform((v) => v === "on" || v === "true"),
});
export type CrashInput = z.infer<typeof crashSchema>;
