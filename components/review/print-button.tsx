"use client";

// The browser's own print dialog is the whole feature: the page's print styles do the layout.
export function PrintButton({ label = "Print" }: { label?: string }) {
  return (
    <button
      type="button"
      onClick={() => window.print()}
      className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white print:hidden"
      data-testid="print-button"
    >
      {label}
    </button>
  );
}
