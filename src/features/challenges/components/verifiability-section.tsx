import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { describeCrossCheck, describeSize, useTargets, type Target } from '@/features/challenges/api/get-targets';
import { chiSquaredText, estimatorName, formatAngle, formatDate, formatDateTime, formatMs, formatSig } from '@/lib/format';
import { Badge, EmptyState, ErrorState, Measured, PageLoading, Panel, ProvenanceList, cx } from '@/components/ui';
import { observableLabel } from './spec-section';

const SHORT: Record<string, string> = { 'tensor-network': 'tensor net.', 'free-fermion': 'free-ferm.', 'pauli-propagation': 'Pauli prop.', 'light-cone-statevector': 'cone SV', statevector: 'SV', clifford: 'Clifford' };

function cellText(t: Target): { top: string; bottom: string } {
  const r = t.reference;
  if (r.status === 'exact') return { top: SHORT[r.method] ?? r.method, bottom: describeSize(r.size).replace(/^1 (site|qubit|term)s/, '1 $1') };
  if (r.status === 'none') return { top: 'none', bottom: t.consensus ? 'consensus' : '' };
  if (r.status === 'sealed') return { top: 'sealed', bottom: formatDate(r.sealedUntil) };
  return { top: 'pending', bottom: '' };
}

const cellClass = (t: Target) =>
  cx(
    'flex h-full min-h-[3.25rem] w-full flex-col items-center justify-center rounded px-1 py-1 text-center text-[11px] leading-tight',
    t.reference.status === 'exact' && 'bg-exact text-paper',
    t.reference.status === 'none' && 'bg-consensus-soft text-consensus-ink',
    t.reference.status === 'sealed' && 'bg-paper-sunk text-ink-soft [background-image:repeating-linear-gradient(45deg,transparent_0,transparent_4px,rgba(0,0,0,.06)_4px,rgba(0,0,0,.06)_8px)]',
    t.reference.status === 'pending' && 'border border-dashed border-rule-strong text-ink-faint',
    t.disputed && 'bg-paper-raised text-disputed-ink ring-2 ring-disputed ring-inset [border-style:dashed]',
  );

export default function VerifiabilitySection({ c }: { c: ChallengeDetail }) {
  const tq = useTargets(c.slug);
  const [selected, setSelected] = useState<string>('');
  const grids = useMemo(() => {
    const ts = tq.data?.targets ?? [];
    const steps = [...new Set(ts.map((t) => t.params.steps ?? 0))].sort((a, b) => a - b);
    const thetas = [...new Set(ts.map((t) => t.params.thetaH ?? 0))].sort((a, b) => a - b);
    return c.observables.map((o) => {
      const map = new Map(ts.filter((t) => t.observable === o.key).map((t) => [`${t.params.steps}|${t.params.thetaH}`, t]));
      return { o, steps, thetas, map };
    });
  }, [tq.data, c.observables]);
  if (tq.isPending) return <PageLoading label="Loading the targets…" />;
  if (tq.isError) return <ErrorState error={tq.error} retry={() => tq.refetch()} />;
  const ts = tq.data.targets;
  if (!ts.length) return <EmptyState title="No targets">This challenge version has no targets.</EmptyState>;
  const count = (s: string) => ts.filter((t) => t.reference.status === s).length;
  const sel = ts.find((t) => t.key === selected);
  return (
    <div className="space-y-6">
      <Panel
        title="Verifiability map"
        id="verifiability"
        description={
          <span className="num">
            {count('exact')} exact · {count('none')} without exact reference · {count('sealed')} sealed · {count('pending')} pending · {ts.filter((t) => t.disputed).length} disputed. Consensus estimator: <strong>{estimatorName(tq.data.estimator ?? c.settings.estimator)}</strong>.
          </span>
        }
      >
        <div className="mb-4 flex flex-wrap gap-3 text-xs text-ink-soft">
          <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-4 rounded-sm bg-exact" />exact (method, size)</span>
          <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-4 rounded-sm bg-consensus-soft ring-1 ring-consensus/30" />none: scored against the consensus</span>
          <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-4 rounded-sm bg-paper-sunk ring-1 ring-rule-strong" />sealed until a date</span>
          <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-4 rounded-sm border border-dashed border-rule-strong" />pending</span>
          <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-4 rounded-sm ring-2 ring-disputed ring-inset" />disputed (open)</span>
          <span>Choose a cell for its details.</span>
        </div>
        <div className="space-y-8">
          {grids.map(({ o, steps, thetas, map }) => (
            <section key={o.key} aria-labelledby={`vm-${o.key}`}>
              <h3 id={`vm-${o.key}`} className="mb-2 text-base font-semibold"><code>{observableLabel(o)}</code></h3>
              <div className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
                <table className="border-separate border-spacing-1 text-sm" data-testid={`verifiability-${o.key}`}>
                  <caption className="sr-only">Reference status of {o.key} by Trotter steps (rows) and θh (columns)</caption>
                  <thead>
                    <tr>
                      <th scope="col" className="pr-1 text-right text-xs font-normal text-ink-soft">steps \ θh</th>
                      {thetas.map((th) => <th key={th} scope="col" className="num min-w-[4.25rem] text-center text-xs font-normal text-ink-soft">{formatAngle(th)}</th>)}
                    </tr>
                  </thead>
                  <tbody>
                    {steps.map((st) => (
                      <tr key={st}>
                        <th scope="row" className="num pr-1 text-right text-xs font-normal text-ink-soft">{st}</th>
                        {thetas.map((th) => {
                          const t = map.get(`${st}|${th}`);
                          if (!t) return <td key={th} />;
                          const txt = cellText(t);
                          return (
                            <td key={th} className="p-0">
                              <button
                                type="button"
                                className={cx(cellClass(t), selected === t.key && 'outline-2 outline-offset-1 outline-focus')}
                                aria-pressed={selected === t.key}
                                aria-label={`${t.key}: ${t.reference.status}${t.disputed ? ', disputed' : ''}`}
                                title={t.reference.status === 'none' ? t.reference.reason ?? 'no exact method is feasible' : undefined}
                                onClick={() => setSelected(selected === t.key ? '' : t.key)}
                              >
                                <span className="font-medium">{t.disputed ? 'disputed' : txt.top}</span>
                                {txt.bottom && <span className="num opacity-80">{txt.bottom}</span>}
                              </button>
                            </td>
                          );
                        })}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              {sel && sel.observable === o.key && <TargetDetail t={sel} slug={c.slug} />}
            </section>
          ))}
        </div>
      </Panel>
    </div>
  );
}

function TargetDetail({ t, slug }: { t: Target; slug: string }) {
  const r = t.reference;
  return (
    <div className="mt-3 rounded-card border border-rule-strong bg-paper p-4 text-sm" aria-live="polite" data-testid="target-detail">
      <div className="mb-2 flex flex-wrap items-center gap-2">
        <code className="font-medium">{t.key}</code>
        <Badge tone={r.status === 'exact' ? 'exact' : r.status === 'none' ? 'consensus' : 'neutral'}>{r.status}</Badge>
        {t.disputed && <Badge tone="disputed">disputed</Badge>}
        <Link to={`/challenges/${encodeURIComponent(slug)}?view=agreement&target=${encodeURIComponent(t.key)}`} className="ml-auto text-xs">agreement on this target</Link>
      </div>
      {r.status === 'exact' && (
        <ProvenanceList
          items={[
            ['Value', <Measured key="v" value={r.value} u={r.uncertainty} />],
            ['Method', r.method],
            ['Size', describeSize(r.size) || '—'],
            ['Cross-check', describeCrossCheck(r.size) || 'none recorded'],
            ['Wall time', formatMs(r.wallMs)],
            ['Engine', r.engineVersion ?? '—'],
            ['Computed', formatDateTime(r.createdAt)],
          ]}
        />
      )}
      {r.status === 'none' && <p><span className="text-ink-soft">No exact method is feasible: </span>{r.reason ?? 'no reason recorded'}</p>}
      {r.status === 'sealed' && <p>The reference is sealed for a blind round until {formatDateTime(r.sealedUntil)}.</p>}
      {r.status === 'pending' && <p>The reference computation has not reached this target yet.</p>}
      {t.consensus && (
        <div className="mt-3 border-t border-rule pt-2">
          <p className="mb-1 font-medium">Consensus of {t.consensus.entries} entries ({estimatorName(t.consensus.estimator)})</p>
          <ProvenanceList
            items={[
              ['Value', <Measured key="c" value={t.consensus.value} u={t.consensus.uncertainty} />],
              ['χ² per degree of freedom', chiSquaredText(t.consensus.chi2, t.consensus.nu)],
              ['p', formatSig(t.consensus.p, 2)],
              ['Birge ratio', formatSig(t.consensus.birgeRatio, 3)],
              ['τ²', formatSig(t.consensus.tau2, 2)],
              ['I²', t.consensus.I2 !== null ? `${formatSig(t.consensus.I2, 2)} %` : '—'],
            ]}
          />
        </div>
      )}
      {t.disputeNote && <p className="mt-2 text-disputed-ink">Dispute: {t.disputeNote}</p>}
      <p className="mt-2"><Link to={`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(t.key)}`}>Every estimate of this target</Link></p>
    </div>
  );
}
