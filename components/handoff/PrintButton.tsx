"use client";
// Opens the browser's print dialog; the page's print styles (app/globals.css, Tailwind print: variants) do the rest.
export function PrintButton() {
  return (
    <button type="button" className="btn-secondary print:hidden" onClick={() => window.print()}>
      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5">
        <path d="M6 8V3h8v5M6 14H4V8h12v6h-2M6 11h8v6H6z" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinejoin="round" />
      </svg>
      Print
    </button>
  );
}
