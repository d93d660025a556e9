"use client";

import "./globals.css";

/** The last resort when even the layout failed: a plain sentence, never a blank page. */
export default function GlobalError({
  reset,
}: {
  error: Error & { digest?: string };
  reset: () => void;
}) {
  return (
    <html lang="en">
      <body>
        <main className="plain-page">
          <h1>heatcheck could not show this page</h1>
          <p>Something went wrong on the server; nothing was changed. Try again in a moment.</p>
          <button type="button" onClick={() => reset()}>
            Try again
          </button>
        </main>
      </body>
    </html>
  );
}
