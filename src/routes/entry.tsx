import { lazy, Suspense, useEffect, useMemo, useState } from 'react';
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from 'react-router';
import { useCompareChoices } from '@/features/compare/api/use-compare-choices';
import { zneSummary } from '@shared/scoring/zne';
import { queryClient } from '@/lib/query-client';
import { getEntryQueryOptions, useEntry, type EntryDocumentEstimate, type EstimateScore } from '@/features/entries/api/get-entry';
import { useTargets, type Target } from '@/features/challenges/api/get-targets';
import { useStandings } from '@/features/standings/api/get-standings';
import { formatDate, formatDateTime, formatHours, formatMeasurement, formatMetric, formatPercent, formatSig, metricName, naturalCompare, zneModelName } from '@/lib/format';
import { Badge, ChartTableToggle, EmptyState, ErrorState, Measured, PageHeader, PageLoading, Panel, Provenance, ProvenanceList, TrackBadge, buttonClass, cx, inputClass } from '@/components/ui';
import { COLORS } from '@/features/challenges/charts/theme';
import { useDocumentTitle } from '@/lib/use-document-title';
import type { Track } from '@shared/vocabulary';

const ConvergenceChart = lazy(() => import('@/features/entries/components/convergence-chart'));

export async function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(getEntryQueryOptions(params.entryId!));
  return null;
}

/**
 * One estimate of the document with the server's score of it (GET /api/entries/:id, the only
 * source of scores: sealed references never reach the client) and its target as the public sees
 * it (the reference value with its provenance, the consensus with its estimator, disputes).
 */
interface Row {
  e: EntryDocumentEstimate;
  t: Target | undefined;
  s: EstimateScore | undefined;
}

/** the exact reference this estimate was scored against, when the server scored it against one */
const exactOf = (r: Row) => (r.s?.reference && r.t?.reference.status === 'exact' ? r.t.reference : null);

/** an error within the rounding noise of a double (the reference's last digits) reads as 0; the title keeps the server's value */
const NOISE = 1e-12;
function errorText(error: number): string {
  return formatSig(Math.abs(error) < NOISE ? 0 : error, 2);
}

function zText(ref: NonNullable<EstimateScore['reference']>): string {
  if (ref.z !== null) return (Math.abs(ref.error) < NOISE ? 0 : ref.z).toFixed(2);
  return Math.abs(ref.error) < NOISE ? '—' : '∞'; // no finite z: a stated uncertainty of 0
}

function dOverU(c: NonNullable<EstimateScore['consensus']>): number {
  return c.U > 0 ? Math.abs(c.d) / c.U : c.d === 0 ? 0 : Infinity;
}

const PAGE = 30;

/** a software item as the document gives it: { name, version }, or a plain string (older house baselines) */
function softwareText(s: { name?: string; version?: string } | string): string {
  if (typeof s === 'string') return s;
  return [s.name, s.version].filter(Boolean).join(' ') || 'not named';
}

export function Component() {
  const { entryId = '' } = useParams();
  const q = useEntry(entryId);
  useDocumentTitle(q.data ? `${q.data.label} (entry)` : 'Entry');
  const slug = q.data?.challenge.slug ?? '';
  const tq = useTargets(slug);
  const st = useStandings(slug, { track: 'all' });
  const [filter, setFilter] = useState('');
  const [all, setAll] = useState(false);
  const [selected, setSelected] = useState('');

  const rows = useMemo((): Row[] => {
    const ests = q.data?.document?.estimates ?? [];
    const byKey = new Map((tq.data?.targets ?? []).map((t) => [t.key, t]));
    const scoreOf = new Map((q.data?.scores ?? []).map((x) => [x.target, x]));
    return ests.map((e) => ({ e, t: byKey.get(e.target), s: scoreOf.get(e.target) })).sort((x, y) => naturalCompare(x.e.target, y.e.target));
  }, [q.data, tq.data]);

  if (q.isPending) return <PageLoading label="Loading the entry…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to="/challenges">See all challenges</Link></ErrorState>;
  const en = q.data;
  const doc = en.document;
  const row = st.data?.entries.find((x) => x.id === en.id);
  const shown = rows.filter((s) => !filter || s.e.target.includes(filter));
  const page = all ? shown : shown.slice(0, PAGE);
  const sel = rows.find((s) => s.e.target === selected);
  const hasZne = rows.some((s) => s.e.noiseScaled?.length);
  const hasTrace = rows.some((s) => s.e.convergence?.length);
  const estimator = tq.data?.estimator;
  const res = doc?.resources;

  return (
    <div>
      <PageHeader
        kicker={<><Link to={`/challenges/${encodeURIComponent(slug)}`}>{slug}</Link> · v{en.challenge.version} · entry</>}
        title={en.label}
        actions={
          <div className="flex flex-wrap gap-2">
            <a className={buttonClass('secondary', 'sm')} href={`/api/entries/${encodeURIComponent(en.id)}/entry.json`} download data-testid="entry-json" title="The entry document as submitted (schemas/entry.schema.json)">JSON</a>
            <a className={buttonClass('secondary', 'sm')} href={`/api/entries/${encodeURIComponent(en.id)}/cite.bib`} download>BibTeX</a>
            {en.state === 'published' && <CompareWith slug={slug} id={en.id} />}
          </div>
        }
      >
        <div className="flex flex-wrap items-center gap-2">
          <TrackBadge track={en.track} />
          {en.isBaseline && <Badge tone="exact">house baseline</Badge>}
          {en.hidden ? <span className="rounded border border-danger/30 bg-danger-soft px-1.5 py-px text-xs font-medium text-danger-ink" data-testid="entry-hidden">hidden by the moderators: {en.hidden.reason}</span> : <Badge tone={en.state === 'published' ? 'ok' : 'neutral'}>{en.state}</Badge>}
          <span className="text-sm">by {en.team.name ? <Link to={`/teams/${encodeURIComponent(en.team.id)}`}>{en.team.name}</Link> : 'a team'}</span>
          <span className="num text-sm">· revision {en.revision} · published {formatDate(en.publishedAt)}</span>
        </div>
      </PageHeader>

      <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <div className="min-w-0 space-y-6">
          <Panel title="Scores" id="entry-scores" description={row ? (row.rank === null ? 'The house baseline: a reference row, never ranked' : `Rank ${row.rank} of ${st.data!.entries.filter((x) => x.rank !== null).length} by ${metricName(st.data!.metric)}${row.rankInterval ? ` (95% interval ${row.rankInterval[0]}–${row.rankInterval[1]})` : ''}, scoring rules ${st.data!.scoringRulesVersion ?? ''}`) : 'From the current standings'}>
            {st.isPending ? <PageLoading label="Loading the standings…" /> : !row ? (
              <EmptyState title="Not in the current standings">The standings are being computed, or this entry is not ranked (withdrawn or superseded).</EmptyState>
            ) : (
              <dl className="grid grid-cols-2 gap-x-6 gap-y-2 text-sm sm:grid-cols-4">
                {([
                  ['Score, every ranked target', formatMetric(row.metrics.scoreOverall)],
                  ['Score, exact references', formatMetric(row.metrics.scoreVerifiable)],
                  ['Score, against the consensus', formatMetric(row.metrics.scoreAgreement)],
                  ['Ranked targets answered', row.coverage ? `${row.coverage.overall.answered} of ${row.coverage.overall.ranked}` : '—'],
                  ['RMSE (verifiable)', formatMetric(row.metrics.rmseVerifiable)],
                  ['Max error', formatMetric(row.metrics.maxErrorVerifiable)],
                  ['Mean z²', formatMetric(row.metrics.meanZ2Verifiable)],
                  ['Coverage', formatPercent(row.metrics.coveredVerifiable)],
                  ['Agreement |d|/U', formatMetric(row.metrics.agreementMedianRatio)],
                  ['Outside interval', String(row.metrics.outsideInterval)],
                  ['Grid coverage', formatPercent(row.metrics.gridCoverage)],
                  ['Classical compute', classicalText(row.cost)],
                  ['QPU time', row.cost.qpuSeconds === undefined ? '—' : formatHours(row.cost.qpuSeconds / 3600)],
                ] as [string, string][]).map(([k, v]) => (
                  <div key={k}><dt className="text-xs text-ink-soft">{k}</dt><dd className="num text-lg">{v}</dd></div>
                ))}
              </dl>
            )}
          </Panel>

          <Panel
            title="Estimates"
            id="entry-estimates"
            description={<span className="num">{rows.length} estimates · {formatPercent(en.coverage.fraction)} of the grid{en.withheld ? ` · ${en.withheld.estimates} withheld until ${formatDate(en.withheld.until)} (sealed references)` : ''}{hasZne ? ' · choose one for the zero-noise re-analysis' : hasTrace ? ' · choose one for its convergence trace' : ''}</span>}
          >
            <div className="mb-3 flex flex-wrap items-center gap-2 text-sm">
              <label className="grow sm:grow-0">
                <span className="sr-only">Filter targets</span>
                <input type="search" placeholder="Filter targets, e.g. z29 or t4-" value={filter} onChange={(e) => setFilter(e.target.value)} className={inputClass(false, 'w-full sm:w-64', true)} aria-label="Filter targets" />
              </label>
              <span className="num ml-auto text-ink-soft">{shown.length} shown</span>
            </div>
            {tq.isError && <p className="mb-2 text-sm text-danger">The references could not be loaded: their values and provenance are missing here (the scores are the server's).</p>}
            <div className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
              <table className="w-full border-collapse text-sm sm:min-w-[40rem] lg:min-w-0" data-testid="entry-estimates">
                <caption className="sr-only">Every estimate of this entry with its score against the exact reference or the consensus</caption>
                <thead>
                  <tr className="text-xs text-ink-soft">
                    <th scope="col" className="border-b border-rule-strong py-2 pr-2 text-left font-semibold">Target</th>
                    <th scope="col" className="border-b border-rule-strong px-2 py-2 text-right font-semibold">Estimate</th>
                    <th scope="col" className="border-b border-rule-strong px-2 py-2 text-right font-semibold">Reference</th>
                    <th scope="col" className="hidden border-b border-rule-strong px-2 py-2 text-right font-semibold sm:table-cell">Error</th>
                    <th scope="col" className="border-b border-rule-strong px-2 py-2 text-right font-semibold">z</th>
                    <th scope="col" className="hidden border-b border-rule-strong px-2 py-2 text-center font-semibold sm:table-cell">Covered</th>
                    <th scope="col" className="border-b border-rule-strong py-2 pl-2 text-right font-semibold">|d|/U</th>
                  </tr>
                </thead>
                <tbody>
                  {page.map((s) => {
                    const r = s.t?.reference;
                    const ref = s.s?.reference ?? null;
                    const cons = ref ? null : s.s?.consensus ?? null;
                    const on = selected === s.e.target;
                    const extra = s.e.noiseScaled?.length || s.e.convergence?.length;
                    return (
                      <tr key={s.e.target} className={cx(on && 'bg-paper-sunk')}>
                        <th scope="row" className="border-b border-rule py-1.5 pr-2 text-left font-normal">
                          {extra ? (
                            <button type="button" className="text-left underline decoration-rule-strong hover:decoration-ink" aria-pressed={on} onClick={() => setSelected(on ? '' : s.e.target)}>
                              <code className="text-xs whitespace-nowrap">{s.e.target}</code>
                            </button>
                          ) : <code className="text-xs whitespace-nowrap">{s.e.target}</code>}
                          {s.t?.disputed && <Badge tone="disputed" className="ml-1">disputed</Badge>}
                        </th>
                        <td className="border-b border-rule px-2 py-1.5 text-right"><Measured value={s.e.value} u={s.e.uncertainty} /><span className="hidden text-[11px] text-ink-faint sm:block">{s.e.uncertaintyKind}</span></td>
                        <td className="border-b border-rule px-2 py-1.5 text-right">
                          {r?.status === 'exact' ? (
                            <span className="inline-block">
                              <span className="inline-flex items-baseline">
                                <Measured value={r.value} u={r.uncertainty} exactLabel={false} />
                                <Provenance label={`Provenance of the reference of ${s.e.target}`}>
                                  <ProvenanceList items={[['Method', r.method], ['Size', Object.entries(r.size ?? {}).map(([k, v]) => `${v} ${k}`).join(', ') || '—'], ['Engine', r.engineVersion ?? '—'], ['Computed', formatDateTime(r.createdAt)], ['Wall time', r.wallMs !== null ? `${formatSig(r.wallMs, 3)} ms` : '—']]} />
                                </Provenance>
                              </span>
                              <span className="hidden text-[11px] text-ink-faint sm:block">exact ({r.method})</span>
                            </span>
                          ) : s.t?.consensus ? (
                            <span className="inline-block text-consensus-ink">
                              <span className="inline-flex items-baseline">
                                <Measured value={s.t.consensus.value} u={s.t.consensus.uncertainty} />
                                <Provenance label={`Provenance of the consensus of ${s.e.target}`}>
                                  <ProvenanceList items={[['Estimator', s.t.consensus.estimator], ['Entries', String(s.t.consensus.entries)], ['χ²/ν', s.t.consensus.chi2 !== null && s.t.consensus.nu ? `${formatSig(s.t.consensus.chi2, 3)}/${s.t.consensus.nu}` : '—'], ['Birge ratio', formatSig(s.t.consensus.birgeRatio, 3)], ['τ²', formatSig(s.t.consensus.tau2, 3)], ['Standings', formatDateTime(tq.data?.standingsComputedAt ?? null)]]} />
                                </Provenance>
                              </span>
                              <span className="block text-[11px]">consensus<span className="hidden sm:inline">, {s.t.consensus.estimator}</span></span>
                            </span>
                          ) : (
                            <span className="text-ink-faint">{r?.status ?? '—'}</span>
                          )}
                        </td>
                        <td className="num hidden border-b border-rule px-2 py-1.5 text-right sm:table-cell" title={ref ? String(ref.error) : undefined}>{ref ? errorText(ref.error) : '—'}</td>
                        <td className={cx('num border-b border-rule px-2 py-1.5 text-right', ref && (ref.z === null ? Math.abs(ref.error) >= NOISE : Math.abs(ref.z) > 3) && 'text-danger')}>{ref ? zText(ref) : '—'}</td>
                        <td className="hidden border-b border-rule px-2 py-1.5 text-center sm:table-cell">{!ref ? '—' : ref.covered ? <span className="text-ok-ink">yes</span> : <span className="text-danger">no</span>}</td>
                        <td
                          className={cx('num border-b border-rule py-1.5 pl-2 text-right', cons && dOverU(cons) > 1 && 'text-disputed-ink')}
                          title={cons ? `d = ${formatSig(cons.d, 2)}, U = ${formatSig(cons.U, 2)} against the consensus${estimator ? ` (${estimator})` : ''}; this entry is ${cons.included ? 'in' : 'not in'} it` : undefined}
                        >{!cons ? '—' : Number.isFinite(dOverU(cons)) ? formatSig(dOverU(cons), 2) : '∞'}</td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
            {shown.length > PAGE && (
              <button type="button" className={buttonClass('ghost', 'sm', 'mt-2')} onClick={() => setAll(!all)} aria-expanded={all}>{all ? 'Show fewer' : `Show all ${shown.length}`}</button>
            )}
            <p className="mt-2 text-xs text-ink-soft">Scores by the Parallax server. Error = estimate − exact reference; z = error / u; covered when |error| ≤ 2u. Where no exact value is public, |d|/U compares with the consensus of the current standings: d = estimate − consensus, U = 2u(d) with u²(d) = u² + τ² − u<sub>c</sub>² for an entry in the consensus, + u<sub>c</sub>² for one outside it.</p>
          </Panel>

          {sel && <EstimateDetail s={sel} track={en.track} />}
        </div>

        <div className="min-w-0 space-y-6">
          <Panel title="Method" id="entry-method">
            <p className="font-medium">{doc?.method?.family ?? en.methodFamily}</p>
            {doc?.method?.description && <p className="mt-1 text-sm text-ink-soft">{doc.method.description}</p>}
            {doc?.method?.settings && Object.keys(doc.method.settings).length > 0 && (
              <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                {Object.entries(doc.method.settings).map(([k, v]) => (
                  <div key={k} className="contents"><dt className="text-ink-soft">{k}</dt><dd className="num break-words">{typeof v === 'object' ? JSON.stringify(v) : String(v)}</dd></div>
                ))}
              </dl>
            )}
          </Panel>
          <Panel title="Resources" id="entry-resources">
            {!res || Object.keys(res).length === 0 ? <p className="text-sm text-ink-soft">None declared.</p> : (
              <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                {res.device && <><dt className="text-ink-soft">Device</dt><dd>{res.device}</dd></>}
                {res.hardware && <><dt className="text-ink-soft">Hardware</dt><dd>{res.hardware}</dd></>}
                {res.qubitsUsed !== undefined && <><dt className="text-ink-soft">Qubits used</dt><dd className="num">{res.qubitsUsed}</dd></>}
                {res.cpuCoreHours !== undefined && <><dt className="text-ink-soft">CPU core-hours</dt><dd className="num">{formatSig(res.cpuCoreHours, 3)}</dd></>}
                {res.gpuHours !== undefined && <><dt className="text-ink-soft">GPU hours</dt><dd className="num">{formatSig(res.gpuHours, 3)}</dd></>}
                {res.qpuSeconds !== undefined && <><dt className="text-ink-soft">QPU seconds</dt><dd className="num">{formatSig(res.qpuSeconds, 3)}</dd></>}
                {res.wallTimeSeconds !== undefined && <><dt className="text-ink-soft">Wall time</dt><dd className="num">{formatHours(res.wallTimeSeconds / 3600)}</dd></>}
                {res.memoryGiB !== undefined && <><dt className="text-ink-soft">Memory</dt><dd className="num">{formatSig(res.memoryGiB, 3)} GiB</dd></>}
                {res.software?.length ? <><dt className="text-ink-soft">Software</dt><dd>{res.software.map((s) => softwareText(s)).join(', ')}</dd></> : null}
                {res.commit && <><dt className="text-ink-soft">Commit</dt><dd><code className="text-xs break-all">{res.commit}</code></dd></>}
              </dl>
            )}
          </Panel>
          <Panel title="Links and licence" id="entry-links">
            <ul className="space-y-1 text-sm">
              {doc?.links?.code && <li>Code: <LinkOrText url={doc.links.code} /></li>}
              {doc?.links?.preprint && <li>Preprint: <LinkOrText url={doc.links.preprint} /></li>}
              {doc?.links?.doi && <li>DOI: <a href={`https://doi.org/${doc.links.doi.replace(/^https?:\/\/doi.org\//, '')}`} rel="noopener noreferrer">{doc.links.doi}</a></li>}
              <li>Licence: {doc?.license ?? 'not stated'}</li>
            </ul>
            {doc?.notes && <p className="mt-2 text-sm text-ink-soft whitespace-pre-line">{doc.notes}</p>}
          </Panel>
          <Panel title="Review and revisions" id="entry-history">
            <ol className="space-y-2 text-sm">
              {(en.history ?? []).map((h, i) => (
                <li key={i}>
                  <time className="num text-ink-soft" dateTime={h.at}>{formatDateTime(h.at)}</time> · {h.action.replace('entry.', '')}
                  {h.reason && <span className="block text-ink-soft">{h.reason}</span>}
                </li>
              ))}
            </ol>
            {en.revisions.length > 1 && (
              <>
                <h3 className="mt-4 mb-1 text-sm font-semibold">Revisions</h3>
                <ol className="space-y-1 text-sm">
                  {en.revisions.map((r) => (
                    <li key={r.id}>
                      {r.id === en.id ? <strong>revision {r.revision}</strong> : <Link to={`/entries/${encodeURIComponent(r.id)}`}>revision {r.revision}</Link>} · {r.state} · {formatDate(r.publishedAt)}
                    </li>
                  ))}
                </ol>
              </>
            )}
          </Panel>
        </div>
      </div>
    </div>
  );
}

function EstimateDetail({ s, track }: { s: Row; track: Track }) {
  const [table, setTable] = useState(false);
  useEffect(() => { document.getElementById('entry-detail')?.scrollIntoView({ block: 'nearest' }); }, [s.e.target]);
  const exact = exactOf(s);
  const ref = exact ? exact.value : null;
  const zne = useMemo(() => (s.e.noiseScaled?.length ? zneSummary(s.e.noiseScaled.map((p) => ({ scale: p.scale, value: p.value, uncertainty: p.uncertainty }))) : null), [s.e.noiseScaled]);
  return (
    <Panel title={<>Estimate <code>{s.e.target}</code></>} id="entry-detail" description={<>The team's value <Measured value={s.e.value} u={s.e.uncertainty} />{exact && <> · exact ({exact.method}) <Measured value={exact.value} u={exact.uncertainty} exactLabel={false} /></>}</>}>
      {zne && (
        <div data-testid="zne">
          <h3 className="mb-1 text-base font-semibold">Zero-noise re-analysis</h3>
          <p className="mb-2 text-sm text-ink-soft">The same noise-scaled data ({s.e.noiseScaled!.length} factors{s.e.unmitigated !== undefined ? `, unmitigated ${formatMeasurement(s.e.unmitigated).text}` : ''}) extrapolated by Parallax with several models, beside the team's own value.</p>
          <table className="w-full border-collapse text-sm">
            <thead>
              <tr className="text-xs text-ink-soft">
                <th scope="col" className="border-b border-rule-strong py-1 pr-2 text-left font-semibold">Model</th>
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right font-semibold">E(0)</th>
                <th scope="col" className="border-b border-rule-strong py-1 pl-2 text-right font-semibold">{ref !== null ? 'Error' : 'χ²/ν'}</th>
              </tr>
            </thead>
            <tbody>
              <tr className="bg-paper-sunk/60">
                <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-medium">the team's value</th>
                <td className="border-b border-rule px-2 py-1 text-right"><Measured value={s.e.value} u={s.e.uncertainty} /></td>
                <td className="num border-b border-rule py-1 pl-2 text-right">{s.s?.reference && ref !== null ? errorText(s.s.reference.error) : ''}</td>
              </tr>
              {zne.models.map((m) => (
                <tr key={m.model}>
                  <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-normal">{zneModelName(m.model)}</th>
                  <td className="border-b border-rule px-2 py-1 text-right">{m.ok ? <Measured value={m.value} u={m.uncertainty} /> : <span className="text-ink-faint" title={m.reason}>not fitted: {m.reason}</span>}</td>
                  <td className="num border-b border-rule py-1 pl-2 text-right">{m.ok ? (ref !== null ? formatSig(m.value - ref, 2) : m.chi2 !== undefined && Number.isFinite(m.chi2) && m.nu ? `${formatSig(m.chi2, 2)}/${m.nu}` : '') : ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {zne.spread.count > 1 && <p className="mt-2 text-sm text-ink-soft">Spread of the models: <span className="num">{formatSig(zne.spread.range, 2)}</span> (sd <span className="num">{formatSig(zne.spread.sd, 2)}</span>) — a measure of the extrapolation's model dependence beside the stated u = <span className="num">{formatSig(s.e.uncertainty, 2)}</span>.</p>}
          <h4 className="mt-3 mb-1 text-sm font-semibold">Noise-scaled data</h4>
          <p className="num text-sm">{s.e.noiseScaled!.map((p) => `c = ${p.scale}: ${formatMeasurement(p.value, p.uncertainty).text}`).join(' · ')}</p>
        </div>
      )}
      {s.e.convergence?.length ? (
        <div className={cx(zne && 'mt-6')}>
          <div className="mb-1 flex flex-wrap items-center justify-between gap-2">
            <h3 className="text-base font-semibold">Convergence trace</h3>
            <ChartTableToggle shown={table} onToggle={() => setTable(!table)} controls="trace-table" />
          </div>
          <Suspense fallback={<PageLoading label="Loading the chart…" />}>
            <div role="img" aria-label={`Convergence of ${s.e.target}: value against the control parameter`}>
              <ConvergenceChart trace={s.e.convergence} reference={ref} color={track === 'hardware' ? COLORS.hardware : COLORS.classical} />
            </div>
          </Suspense>
          {table && (
            <table id="trace-table" className="mt-2 border-collapse text-sm">
              <thead><tr className="text-xs text-ink-soft"><th scope="col" className="pr-4 text-left">parameter</th><th scope="col" className="pr-4 text-right">value</th><th scope="col" className="text-right">cost</th></tr></thead>
              <tbody>
                {s.e.convergence.map((p) => (
                  <tr key={p.parameter}><td className="num pr-4">{p.parameter}</td><td className="num pr-4 text-right">{formatSig(p.value, 6)}</td><td className="num text-right">{p.cost !== undefined ? formatSig(p.cost, 3) : '—'}</td></tr>
                ))}
              </tbody>
            </table>
          )}
        </div>
      ) : null}
    </Panel>
  );
}

/** A link only for http(s) addresses (entries stored before the schema refused other schemes show as text). */
function LinkOrText({ url }: { url: string }) {
  return /^https?:\/\//i.test(url)
    ? <a href={url} rel="noopener noreferrer" className="break-all">{url}</a>
    : <span className="break-all">{url}</span>;
}

/** CPU core-hours and GPU hours, never added to QPU time */
function classicalText(c: { cpuCoreHours?: number; gpuHours?: number }): string {
  const parts = [c.cpuCoreHours !== undefined ? `${formatHours(c.cpuCoreHours)} CPU` : '', c.gpuHours !== undefined ? `${formatHours(c.gpuHours)} GPU` : ''].filter(Boolean);
  return parts.length ? parts.join(' + ') : '—';
}

function CompareWith({ slug, id }: { slug: string; id: string }) {
  const choices = useCompareChoices(slug);
  const navigate = useNavigate();
  return (
    <label className="inline-flex items-center gap-2 text-sm">
      <span className="text-ink-soft">Compare with</span>
      <select defaultValue="" onChange={(e) => e.target.value && navigate(`/compare?a=${encodeURIComponent(id)}&b=${encodeURIComponent(e.target.value)}`)} className={inputClass(false, 'w-48', true)} data-testid="compare-with">
        <option value="" disabled>choose…</option>
        <option value="consensus">the consensus</option>
        {choices.filter((x) => x.id !== id).map((x) => <option key={x.id} value={x.id}>{x.label}</option>)}
      </select>
    </label>
  );
}
