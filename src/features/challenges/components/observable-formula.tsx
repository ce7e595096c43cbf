import { Fragment } from 'react';
import type { ObservableSpec, PauliFactor } from '@shared/physics/circuit';
import { formatPauli } from '@shared/physics/observable';
import { formatSig } from '@/lib/format';

/** X₃ Y₄ Z₉ as a physicist writes it: the Pauli letter with its qubit as a subscript */
export function PauliProduct({ factors }: { factors: readonly PauliFactor[] }) {
  if (!factors.length) return <span className="font-serif italic">I</span>;
  return (
    <span className="whitespace-nowrap" aria-label={formatPauli(factors)}>
      {factors.map((f, i) => (
        <Fragment key={f.qubit}>
          {i > 0 && '\u2009'}
          <span className="font-serif italic">{f.op}</span><sub className="num">{f.qubit}</sub>
        </Fragment>
      ))}
    </span>
  );
}

/**
 * An observable written out: one Pauli string, or a weighted sum "0.5 Z₀Z₁ + 0.5 Z₁Z₂ …" (the
 * first `max` terms, then how many more, all of them in a disclosure).
 */
export function ObservableFormula({ o, max = 6 }: { o: ObservableSpec | null | undefined; max?: number }) {
  if (!o) return <span className="text-ink-soft">(does not parse)</span>;
  if (o.terms.length === 1 && o.terms[0].coef === 1) return <PauliProduct factors={o.terms[0].factors} />;
  const term = (t: ObservableSpec['terms'][number], i: number) => (
    <Fragment key={i}>
      {i > 0 ? (t.coef < 0 ? ' \u2212 ' : ' + ') : t.coef < 0 ? '\u2212' : ''}
      {Math.abs(t.coef) !== 1 && <span className="num">{formatSig(Math.abs(t.coef), 4)}{'\u2009'}</span>}
      <PauliProduct factors={t.factors} />
    </Fragment>
  );
  if (o.terms.length <= max) return <span>{o.terms.map(term)}</span>;
  return (
    <span>
      {o.terms.slice(0, max).map(term)} <span className="text-ink-soft">+ {o.terms.length - max} more terms</span>
      <details className="mt-1 text-xs print:open">
        <summary className="cursor-pointer text-ink-soft print:hidden">All {o.terms.length} terms</summary>
        <span className="block leading-6">{o.terms.map(term)}</span>
      </details>
    </span>
  );
}

/** plain text of an observable for option labels and titles: "X3 Y4 Z9", "0.5 Z0 Z1 + 0.5 Z1 Z2" */
export function observableText(o: ObservableSpec | null | undefined, max = 3): string {
  if (!o) return '';
  if (o.terms.length === 1 && o.terms[0].coef === 1) return formatPauli(o.terms[0].factors);
  const parts = o.terms.slice(0, max).map((t, i) => `${i > 0 ? (t.coef < 0 ? ' − ' : ' + ') : t.coef < 0 ? '−' : ''}${Math.abs(t.coef) !== 1 ? `${formatSig(Math.abs(t.coef), 4)} ` : ''}${formatPauli(t.factors)}`);
  return parts.join('') + (o.terms.length > max ? ` + ${o.terms.length - max} more` : '');
}
