"use client";

/** Opens the browser's print dialog; the print stylesheet lays the queue out eight airframes per A4 page. */
export function PrintButton({ label }: { label: string }) {
  return (
    <button type="button" className="secondary small" onClick={() => window.print()}>
      {label}
    </button>
  );
}
