"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";

export function SignInForm() {
  const router = useRouter();
  const [error, setError] = useState("");
  const [pending, setPending] = useState(false);
  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setError("");
    const r = await signIn("credentials", {
      email: fieldText(form, "email"),
      password: fieldText(form, "password"),
      redirect: false,
    });
    setPending(false);
    if (r?.ok) {
      router.push("/");
      router.refresh();
    } else {
      // A throttled attempt says how long to wait; any other failure gets the one sentence.
      setError(
        r?.error?.startsWith("Too many")
          ? r.error
          : "That email and password do not match an account.",
      );
    }
  }
  return (
    <form className="stack" onSubmit={(e) => void submit(e)}>
      <label>
        Email
        <input name="email" type="email" autoComplete="username" required />
      </label>
      <label>
        Password
        <input name="password" type="password" autoComplete="current-password" required />
      </label>
      {error ? (
        <p className="form-message error" role="alert">
          {error}
        </p>
      ) : null}
      <div>
        <button type="submit" disabled={pending}>
          {pending ? "Signing in…" : "Sign in"}
        </button>
      </div>
    </form>
  );
}

/** A text field's value; a file input (never on this form) reads as empty. */
function fieldText(form: FormData, name: string): string {
  const v = form.get(name);
  return typeof v === "string" ? v : "";
}
