import type { ReactNode } from 'react';

/** A raised panel with an optional heading. */
export function Card({ title, children, className = '', headingLevel = 2, aside }: { title?: string; children: ReactNode; className?: string; headingLevel?: 2 | 3; aside?: ReactNode }) {
  const H = headingLevel === 2 ? 'h2' : 'h3';
  return (
    <section className={`rounded-lg border border-line bg-surface-raised p-4 sm:p-5 ${className}`}>
      {(title || aside) && (
        <div className="mb-3 flex items-baseline justify-between gap-3">
          {title && <H className="text-base font-semibold text-ink">{title}</H>}
          {aside}
        </div>
      )}
      {children}
    </section>
  );
}
