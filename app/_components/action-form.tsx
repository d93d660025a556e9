"use client";

import { useActionState, type ReactNode } from "react";
import type { ActionState } from "@/lib/server/actions";

export interface ActionFormProps {
  action: (prev: ActionState, form: FormData) => Promise<ActionState>;
  submitLabel: string;
  children: ReactNode;
  className?: string;
  danger?: boolean;
  testId?: string;
  /** One line: the fields and a small button side by side (for forms inside table rows). */
  compact?: boolean;
}

const IDLE: ActionState = { ok: false, message: "" };

/** A form bound to a server action: shows the outcome and each field's message. */
export function ActionForm({
  action,
  submitLabel,
  children,
  className = "stack",
  danger = false,
  testId,
  compact = false,
}: ActionFormProps) {
  const [state, formAction, pending] = useActionState(action, IDLE);
  if (compact) {
    return (
      <form action={formAction} className="inline-form" data-testid={testId}>
        {children}
        <button
          type="submit"
          disabled={pending}
          className={danger ? "danger small" : "secondary small"}
        >
          {pending ? "…" : submitLabel}
        </button>
        {state.message ? (
          <span className={`form-message small ${state.ok ? "ok" : "error"}`} role="status">
            {state.message}
          </span>
        ) : null}
      </form>
    );
  }
  return (
    <form action={formAction} className={className} data-testid={testId}>
      {children}
      {state.fieldErrors ? (
        <ul className="field-error">
          {Object.entries(state.fieldErrors).map(([field, message]) => (
            <li key={field}>
              {field}: {message}
            </li>
          ))}
        </ul>
      ) : null}
      {state.secret ? (
        <div>
          <p className="small">Copy this token now; it is not shown again.</p>
          <div className="secret" data-testid="new-token">
            {state.secret}
          </div>
        </div>
      ) : null}
      {state.message ? (
        <p className={`form-message ${state.ok ? "ok" : "error"}`} role="status">
          {state.message}
        </p>
      ) : null}
      <div>
        <button type="submit" disabled={pending} className={danger ? "danger" : undefined}>
          {pending ? "Saving…" : submitLabel}
        </button>
      </div>
    </form>
  );
}
