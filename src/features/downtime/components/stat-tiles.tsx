import type { ReactNode } from 'react';

/** A row of headline figures, each with its label and a line saying how it is worked out. */
export function StatTiles({ items }: { items: { label: string; value: ReactNode; detail: string }[] }) {
  return (
    <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
      {items.map((i) => (
        <div key={i.label} className="rounded-lg border border-basalt-200 bg-white p-4 shadow-sm">
          <dt className="text-caption font-semibold text-basalt-700">{i.label}</dt>
          <dd className="text-display">{i.value}</dd>
          <dd className="text-caption text-basalt-600">{i.detail}</dd>
        </div>
      ))}
    </dl>
  );
}
