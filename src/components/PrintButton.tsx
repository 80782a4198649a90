'use client';
/** Opens the browser's print dialog (the page's print stylesheet hides navigation and buttons). */
export function PrintButton({ label = 'Print this sheet' }: { label?: string }) {
  return (
    <button type="button" className="btn no-print" onClick={() => window.print()}>
      {label}
    </button>
  );
}
