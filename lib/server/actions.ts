import "server-only";
import type { z } from "zod";
import { isDomainError } from "@/lib/errors";
import type { Actor, Role } from "@/lib/roles";
import { formToObject } from "@/lib/validations/common";
import { requireMember } from "./guard";

/** What every server action returns to its form. */
export interface ActionState {
  ok: boolean;
  message: string;
  fieldErrors?: Record<string, string>;
  /** A value to show once (a new API token). */
  secret?: string;
}

/**
 * The shape of every server action: the guard first, then the zod schema (field messages on
 * failure), then the service. Domain errors become their sentence; anything else is logged with
 * its context and the user sees a plain apology, never a stack trace.
 */
export async function runAction<S extends z.ZodType>(
  name: string,
  minimum: Role,
  schema: S,
  form: FormData,
  run: (actor: Actor, input: z.output<S>) => Promise<string | ActionState>,
): Promise<ActionState> {
  try {
    const actor = await requireMember(minimum);
    const parsed = schema.safeParse(formToObject(form));
    if (!parsed.success) {
      const fieldErrors: Record<string, string> = {};
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? "form");
        fieldErrors[key] ??= issue.message;
      }
      return { ok: false, message: "Check the highlighted fields.", fieldErrors };
    }
    const result = await run(actor, parsed.data);
    return typeof result === "string" ? { ok: true, message: result } : result;
  } catch (e) {
    if (isDomainError(e)) return { ok: false, message: e.message };
    console.error(`server action ${name} failed`, e);
    return {
      ok: false,
      message: "Something went wrong on the server; nothing was changed. Try again.",
    };
  }
}
