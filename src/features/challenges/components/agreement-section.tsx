import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useAgreement, type AgreementEntry } from '@/features/challenges/api/get-agreement';
import { useTargets } from '@/features/challenges/api/get-targets';
import { estimatorName, formatDateTime, formatSig } from '@/lib/format';
import { ChartTableToggle, EmptyState, ErrorState, Measured, PageLoading, Panel, Spinner, TrackMark, inputClass } from '@/components/ui';
import AgreementHeatmap, { ratioColor, type HeatRow } from '@/features/challenges/charts/agreement-heatmap';

/** short row names for the matrix: "A · BP-gauged PEPS" */
const short = (e: AgreementEntry, i: number) => `${String.fromCharCode(65 + (i % 26))} · ${(e.label ?? e.id).slice(0, 22)}${(e.label ?? '').length > 22 ? '…' : ''}`;

export default function AgreementSection({ c }: { c: ChallengeDetail }) {
  const [params, setParams] = useSearchParams();
  const target = params.get('target') ?? '';
  const setTarget = (t: string) => setParams((p) => { const n = new URLSearchParams(p); if (t) n.set('target', t); else n.delete('target'); return n; }, { replace: true });
  const [showTable, setShowTable] = useState(false);
  const q = useAgreement(c.slug, target);
  const tq = useTargets(c.slug);
  const options = useMemo(() => {
    const ts = tq.data?.targets ?? [];
    const none = ts.filter((t) => t.reference.status !== 'exact');
    const exact = ts.filter((t) => t.reference.status === 'exact');
    return { none, exact };
  }, [tq.data]);

  const model = useMemo(() => {
    const d = q.data;
    if (!d) return null;
    const names = d.entries.map(short);
    const ratio = d.mode === 'target' ? d.ratio : d.meanRatio;
    const counts = d.mode === 'average-unverifiable' ? d.targets : null;
    const incompatible = d.mode === 'average-unverifiable' ? d.incompatible ?? null : null;
    let incompatiblePairs = 0;
    incompatible?.forEach((r, i) => r.forEach((k, j) => { if (j > i && k > 0) incompatiblePairs++; }));
    const rows: HeatRow[] = d.entries.map((_, i) => ({
      id: String.fromCharCode(65 + (i % 26)),
      data: d.entries.map((__, j) => ({ x: String.fromCharCode(65 + (j % 26)), y: i === j ? null : ratio[i]?.[j] ?? null, n: counts?.[i]?.[j] })),
    }));
    return { rows, names, ratio, counts, incompatible, incompatiblePairs };
  }, [q.data]);

  const d = q.data;
  const n = d?.entries.length ?? 0;
  return (
    <Panel
      title="Agreement between entries"
      id="agreement"
      description="Pairwise |d|/U: the difference of two estimates over its expanded uncertainty (k = 2). Below 1 the two agree within their stated uncertainties."
      actions={q.isFetching && !q.isPending ? <Spinner size="sm" label="" /> : undefined}
    >
      <div className="mb-4 flex flex-wrap items-end gap-3 text-sm">
        <label className="min-w-0 grow sm:grow-0">
          <span className="mb-1 block text-xs text-ink-soft">Compare on</span>
          <select aria-label="Compare on" value={target} onChange={(e) => setTarget(e.target.value)} className={inputClass(false, 'w-full pr-7 sm:w-auto', true)}>
            <option value="">the average over targets without exact reference</option>
            {options.none.length > 0 && (
              <optgroup label="Targets without exact reference">
                {options.none.map((t) => <option key={t.key} value={t.key}>{t.key}{t.disputed ? ' (disputed)' : ''}</option>)}
              </optgroup>
            )}
            {options.exact.length > 0 && (
              <optgroup label="Targets with exact reference">
                {options.exact.map((t) => <option key={t.key} value={t.key}>{t.key}</option>)}
              </optgroup>
            )}
          </select>
        </label>
        <span className="ml-auto"><ChartTableToggle shown={showTable} onToggle={() => setShowTable(!showTable)} controls="agreement-table" /></span>
      </div>
      {q.isPending ? (
        <PageLoading label="Loading the agreement matrix…" />
      ) : q.isError ? (
        <ErrorState error={q.error} retry={() => q.refetch()} />
      ) : n < 2 || !model ? (
        <EmptyState title="Nothing to compare yet">
          {target ? 'Fewer than two entries answered this target.' : 'Fewer than two entries answered targets without an exact reference. Choose a single target above.'}
        </EmptyState>
      ) : (
        <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
          <div>
            <div className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
              <div style={{ minWidth: 40 + n * 34, maxWidth: 60 + n * 110 }}>
                <AgreementHeatmap rows={model.rows} height={Math.max(220, 30 + n * 40)} />
              </div>
            </div>
            <div className="mt-2 flex items-center gap-2 text-xs text-ink-soft" aria-hidden="true">
              <span>0</span>
              <span className="h-2 w-40 rounded-sm" style={{ background: `linear-gradient(to right, ${[0, 0.5, 1, 1.5, 2, 3, 4].map((v) => ratioColor(v)).join(',')})` }} />
              <span>4+</span>
              <span className="ml-2">|d|/U; 1 is the edge of agreement</span>
            </div>
          </div>
          <div className="text-sm">
            <h3 className="mb-2 text-base font-semibold">Entries</h3>
            <ol className="space-y-1.5">
              {d!.entries.map((e, i) => (
                <li key={e.id} className="flex items-start gap-2">
                  <span className="num w-4 shrink-0 font-medium">{String.fromCharCode(65 + i)}</span>
                  {e.track && <TrackMark track={e.track} className="mt-1.5" />}
                  <span className="min-w-0">
                    <Link to={`/entries/${encodeURIComponent(e.id)}`} className="break-words">{e.label ?? e.id}</Link>
                    <span className="text-ink-soft"> · {e.teamName}</span>
                    {e.value !== undefined && <span className="block"><Measured value={e.value} u={e.uncertainty} /></span>}
                  </span>
                </li>
              ))}
            </ol>
            {d!.mode === 'target' && d!.consensus && (
              <p className="mt-4 rounded border border-consensus/30 bg-consensus-soft px-3 py-2">
                Consensus ({estimatorName(d!.consensus.estimator)}): <Measured value={d!.consensus.value} u={d!.consensus.uncertainty} />
                {d!.consensus.disputed && <span className="ml-1 text-disputed-ink">· disputed</span>}
              </p>
            )}
            {model.incompatiblePairs > 0 && (
              <p className="mt-3 text-xs text-disputed-ink" data-testid="incompatible-note">
                {model.incompatiblePairs === 1 ? 'One pair differs' : `${model.incompatiblePairs} pairs differ`} on targets where both claim zero uncertainty:
                no finite |d|/U exists there, so those targets are left out of the mean and counted after the “+” in the table.
              </p>
            )}
            <p className="mt-3 text-xs text-ink-soft">Computed {formatDateTime(d!.computedAt)}</p>
          </div>
          {showTable && (
            <div id="agreement-table" className="overflow-x-auto lg:col-span-2">
              <table className="border-collapse text-sm" data-testid="agreement-table">
                <caption className="mb-2 text-left font-semibold">|d|/U between each pair{d!.mode === 'average-unverifiable' ? ' (mean over the shared targets without exact reference; the count in brackets)' : ''}</caption>
                <thead>
                  <tr>
                    <td />
                    {d!.entries.map((_, j) => <th key={j} scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">{String.fromCharCode(65 + j)}</th>)}
                  </tr>
                </thead>
                <tbody>
                  {d!.entries.map((e, i) => (
                    <tr key={e.id}>
                      <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-normal">{model.names[i]}</th>
                      {d!.entries.map((_, j) => (
                        <td key={j} className="num border-b border-rule px-2 py-1 text-right">
                          {i === j ? '·' : model.ratio[i]?.[j] === null || model.ratio[i]?.[j] === undefined ? '—' : formatSig(model.ratio[i][j], 3)}
                          {model.counts && i !== j && <span className="text-ink-faint"> ({model.counts[i]?.[j] ?? 0}{model.incompatible?.[i]?.[j] ? <span className="text-disputed-ink"> + {model.incompatible[i][j]} at U = 0</span> : null})</span>}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
      )}
    </Panel>
  );
}
