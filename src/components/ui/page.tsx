import type { ReactNode } from 'react';

export function Page({ title, actions, children }: { title: string; actions?: ReactNode; children: ReactNode }) {
  return (
    <section className="mx-auto max-w-6xl space-y-6 p-4 md:p-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1>{title}</h1>
        {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
      </div>
      {children}
    </section>
  );
}

export function Panel({ title, children }: { title?: string; children: ReactNode }) {
  return (
    <div className="rounded-lg border border-basalt-200 bg-white p-4 shadow-sm">
      {title && <h2 className="mb-3">{title}</h2>}
      {children}
    </div>
  );
}

/** What shows while a page's code or first data loads. */
export function PageLoading() {
  return <p className="p-6">Loading…</p>;
}
