'use client';
export function PrintButton() {
  return (
    <p>
      <button type="button" className="btn secondary" onClick={() => window.print()}>
        Print this report
      </button>
    </p>
  );
}
