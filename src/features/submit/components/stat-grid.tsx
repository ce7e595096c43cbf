/** a few headline numbers as labelled tiles: three a row on a phone, all in one row when wide */
export function StatGrid({ items, testId }: { items: readonly (readonly [string, string])[]; testId?: string }) {
  return (
    <dl className="grid grid-cols-3 gap-2 sm:grid-cols-6" data-testid={testId}>
      {items.map(([k, v]) => (
        <div key={k} className="rounded border border-rule px-2 py-1.5">
          <dt className="text-xs text-ink-soft">{k}</dt>
          <dd className="num font-medium" data-testid={testId ? `${testId}-${k.toLowerCase().replace(/[^a-z0-9]+/g, '-')}` : undefined}>{v}</dd>
        </div>
      ))}
    </dl>
  );
}
