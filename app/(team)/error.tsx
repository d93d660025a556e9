"use client";

import Link from "next/link";

/** A screen that failed: a plain sentence instead of a blank page (the server logged the details). */
export default function TeamError({
  reset,
}: {
  error: Error & { digest?: string };
  reset: () => void;
}) {
  return (
    <section className="card plain-page" role="alert">
      <h1>This screen could not be shown</h1>
      <p>
        Something went wrong on the server; nothing was changed. Try again, or go back to the
        inspection queue.
      </p>
      <p className="row">
        <button type="button" onClick={() => reset()}>
          Try again
        </button>
        <Link href="/">Inspection queue</Link>
      </p>
    </section>
  );
}
