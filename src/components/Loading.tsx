/** A quiet loading line, announced to screen readers. */
export function Loading({ what }: { what: string }) {
  return (
    <p role="status" className="py-6 text-sm text-muted">
      Loading {what}…
    </p>
  );
}
