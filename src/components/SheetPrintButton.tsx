'use client';
/** Opens the browser's print dialog for a day sheet (the print stylesheet hides navigation and buttons). */
export function SheetPrintButton() {
  return (
    <button type="button" className="btn no-print" onClick={() => window.print()}>
      Print this sheet
    </button>
  );
}
