/** A labelled bar of work done out of the total (references, regrades); failures striped. */
export function ProgressBar({ ready, failed, total, label }: { ready: number; failed: number; total: number; label: string }) {
  const pct = total > 0 ? (ready / total) * 100 : 0;
  const fpct = total > 0 ? (failed / total) * 100 : 0;
  return (
    <div className="flex flex-col gap-1">
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={total}
        aria-valuenow={ready}
        aria-valuetext={`${ready} of ${total} ready${failed ? `, ${failed} failed` : ''}`}
        className="flex h-2.5 w-full overflow-hidden rounded-full border border-line-strong bg-surface-sunken"
      >
        <div className="h-full bg-ok transition-[width] duration-500" style={{ width: `${pct}%` }} />
        {failed > 0 && <div className="h-full bg-danger bg-[repeating-linear-gradient(45deg,transparent_0_3px,rgba(255,255,255,0.45)_3px_5px)]" style={{ width: `${fpct}%` }} />}
      </div>
    </div>
  );
}
