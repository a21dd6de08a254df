import type { ReactNode } from 'react';

export function PageHeader({ title, eyebrow, children }: { title: string; eyebrow?: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-6">
      {eyebrow && <div className="mb-1 text-sm text-muted">{eyebrow}</div>}
      <h1 className="text-2xl font-semibold tracking-tight text-ink">{title}</h1>
      {children && <div className="mt-1.5 text-sm text-muted">{children}</div>}
    </div>
  );
}
