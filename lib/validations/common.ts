import { z } from "zod";

/** A trimmed, non-empty line of text. */
export const nameField = (what: string, max = 80) =>
  z
    .string()
    .trim()
    .min(1, `Give the ${what}.`)
    .max(max, `Keep the ${what} under ${max} characters.`);

export const optionalText = (max = 2000) =>
  z.string().trim().max(max, `Keep this under ${max} characters.`).default("");

export const idField = z.string().trim().min(1, "Choose one.").max(64);

/** An <input type="datetime-local"> value, or an ISO string; empty means now. */
export const dateTimeField = z
  .string()
  .trim()
  .optional()
  .transform((v, ctx) => {
    if (!v) return new Date();
    const d = new Date(v);
    if (Number.isNaN(d.getTime())) {
      ctx.addIssue({ code: "custom", message: "Give a date and time." });
      return z.NEVER;
    }
    return d;
  });

/** Form fields arrive as strings; an empty string is "not given". */
export const optionalNumber = (min: number, max: number, integer = false) =>
  z
    .string()
    .trim()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v === "") return null;
      const n = Number(v);
      if (!Number.isFinite(n) || n < min || n > max || (integer && !Number.isInteger(n))) {
        ctx.addIssue({
          code: "custom",
          message: `Give ${integer ? "a whole number" : "a number"} from ${min} to ${max}, or leave it empty.`,
        });
        return z.NEVER;
      }
      return n;
    });

/** Turns FormData into a plain object; repeated keys become arrays. */
export function formToObject(form: FormData): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const [key, value] of form.entries()) {
    if (typeof value !== "string") continue;
    const prev = out[key];
    if (prev === undefined) out[key] = value;
    else out[key] = Array.isArray(prev) ? [...prev, value] : [prev, value];
  }
  return out;
}

/** A list field that may arrive as one string or several. */
export const stringList = z
  .union([z.string(), z.array(z.string())])
  .optional()
  .transform((v) =>
    (v === undefined ? [] : Array.isArray(v) ? v : [v]).map((s) => s.trim()).filter(Boolean),
  );
