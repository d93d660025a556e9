"use client";

/** The sign-in screen failed on the server: one plain sentence and a retry (the server logged it). */
export default function SignInError({
  reset,
}: {
  error: Error & { digest?: string };
  reset: () => void;
}) {
  return (
    <main className="plain-page">
      <section className="card" role="alert">
        <h1>Sign-in is not available just now</h1>
        <p>The server could not show the sign-in screen. Wait a moment and try again.</p>
        <button type="button" onClick={() => reset()}>
          Try again
        </button>
      </section>
    </main>
  );
}
