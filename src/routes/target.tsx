import { lazy, Suspense, useMemo } from 'react';
import { Link, useParams } from 'react-router';
import { parseObservable, type ObservableJson } from '@shared/physics/observable';
import { useTarget, type TargetDetail, type TargetEstimate } from '@/features/targets/api/get-target';
import { describeCrossCheck, describeSize } from '@/features/challenges/api/get-targets';
import { ObservableFormula } from '@/features/challenges/components/observable-formula';
import { Legend, LegendMark } from '@/features/challenges/components/chart-bits';
import type { MarkKind } from '@/features/challenges/charts/theme';
import { Badge, EmptyState, ErrorState, Measured, PageHeader, PageLoading, Panel, Table, Td, Th, TrackMark } from '@/components/ui';
import { chiSquaredText, estimatorName, formatAngle, formatDateTime, formatMeasurement, formatMs, formatSig, naturalCompare, zneModelName } from '@/lib/format';
import { useDocumentTitle } from '@/lib/use-document-title';

const ForestPlot = lazy(() => import('@/features/targets/components/forest-plot'));
const ZneChart = lazy(() => import('@/features/targets/components/zne-chart'));

const markOf = (e: TargetEstimate['entry']): MarkKind => (e.isBaseline ? 'baseline' : e.track);

export function Component() {
  const { slug = '', targetKey = '' } = useParams();
  const q = useTarget(slug, targetKey);
  useDocumentTitle(`Target ${targetKey}`);
  if (q.isPending) return <PageLoading label="Loading the target…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to={`/challenges/${encodeURIComponent(slug)}`}>Back to the challenge</Link></ErrorState>;
  return <TargetPage slug={slug} t={q.data} />;
}

function TargetPage({ slug, t }: { slug: string; t: TargetDetail }) {
  const base = `/challenges/${encodeURIComponent(slug)}`;
  const obs = useMemo(() => { try { return parseObservable({ ...(t.observable.spec as ObservableJson), id: t.observable.key }, Number.POSITIVE_INFINITY); } catch { return null; } }, [t.observable]);
  const exact = t.reference.status === 'exact' ? t.reference : null;
  const cons = t.consensus && t.consensus.value !== null && t.consensus.uncertainty !== null ? { value: t.consensus.value, uncertainty: t.consensus.uncertainty } : null;
  const sorted = useMemo(() => [...t.estimates].sort((a, b) => a.value - b.value || naturalCompare(a.entry.label, b.entry.label)), [t.estimates]);
  const rows = sorted.map((e, i) => ({ x: e.value, y: i, u: e.uncertainty, label: e.entry.label, mark: markOf(e.entry), id: e.entry.id }));
  const hardware = t.estimates.filter((e) => e.zne);
  return (
    <div className="space-y-6">
      <PageHeader kicker={<><Link to={base}>Challenge</Link> · <Link to={`${base}?view=spec`}>specification</Link> · <Link to={`${base}/depth?observable=${encodeURIComponent(t.observable.key)}`}>depth view</Link></>} title={<>Target <code className="break-all">{t.key}</code></>}>
        <p className="text-ink">
          ⟨<ObservableFormula o={obs} max={4} />⟩ after <span className="num">{t.params.steps ?? '—'}</span> step{t.params.steps === 1 ? '' : 's'} at θ<sub>h</sub> = <span className="num">{t.params.thetaH !== undefined ? formatAngle(t.params.thetaH) : '—'}</span>
          {t.params.thetaJ !== undefined && <>, θ<sub>J</sub> = <span className="num">{formatAngle(t.params.thetaJ)}</span></>}
        </p>
        <p className="mt-1 text-xs">Challenge version {t.version} · {t.engineVersion}</p>
        {t.disputed && <p className="mt-2"><Badge tone="disputed">disputed</Badge> {t.disputeNote}</p>}
      </PageHeader>

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
        <ReferencePanel t={t} />
        <ConsensusPanel t={t} />
      </div>

      <Panel title="Every estimate" id="target-forest" description={<>Each team&rsquo;s estimate with its interval (thick: ±u; thin: ±2u) against {exact ? 'the exact reference (line)' : cons ? 'the consensus (band: ±u)' : 'no reference or consensus yet'}.</>}>
        {rows.length === 0 ? <EmptyState title="No published estimate of this target yet" /> : (
          <>
            <Legend>
              <LegendMark kind="hardware">hardware</LegendMark>
              <LegendMark kind="classical">classical</LegendMark>
              <LegendMark kind="baseline">house baseline</LegendMark>
              {exact && <LegendMark kind="exact">exact reference</LegendMark>}
              {!exact && cons && <LegendMark kind="consensus">consensus ±u</LegendMark>}
            </Legend>
            <Suspense fallback={<PageLoading label="Loading the chart…" />}>
              <ForestPlot rows={rows} reference={exact ? exact.value : null} consensus={exact ? null : cons}
                label={`Forest plot of ${rows.length} estimates of ${t.key}${exact ? ' against the exact reference' : cons ? ' against the consensus' : ''}; the same numbers are in the table of degrees of equivalence below`}
                describedBy="doe-table" />
            </Suspense>
          </>
        )}
      </Panel>

      <Panel title="Degrees of equivalence" id="target-doe" description={<>d = estimate − {exact ? 'reference' : 'consensus'}, U = 2u(d){exact ? ' with u²(d) = u² + u²(reference)' : '; u(d) accounts for the estimate being part of the consensus or not'}. |d|/U above 1: the two disagree beyond their stated uncertainties.</>}>
        <Table aria-label={`Estimates of ${t.key} and their degrees of equivalence`} id="doe-table" data-testid="doe-table" tabIndex={0}>
          <thead><tr><Th>Entry</Th><Th className="hidden sm:table-cell">Method</Th><Th num>Estimate</Th><Th num>d</Th><Th num>U</Th><Th num>|d|/U</Th>{!exact && <Th>In the consensus</Th>}</tr></thead>
          <tbody>
            {sorted.map((e) => {
              const q = e.equivalence;
              const ratio = q && q.U > 0 ? Math.abs(q.d) / q.U : null;
              return (
                <tr key={e.entry.id}>
                  <Td><span className="inline-flex min-w-[9rem] items-start gap-1.5"><TrackMark track={e.entry.track} size={10} /><Link to={`/entries/${e.entry.id}`} className="line-clamp-2" title={e.entry.label}>{e.entry.label}</Link></span><span className="block text-xs text-ink-soft">{e.entry.teamName}<span className="sm:hidden"> · {e.entry.methodFamily}</span></span></Td>
                  <Td className="hidden text-xs sm:table-cell">{e.entry.methodFamily}{e.entry.isBaseline && ' (house baseline)'}</Td>
                  <Td num><Measured value={e.value} u={e.uncertainty} /> <span className="block text-xs text-ink-soft">{e.kind}</span></Td>
                  <Td num>{q ? formatSig(q.d, 2) : '—'}</Td>
                  <Td num>{q ? formatSig(q.U, 2) : '—'}</Td>
                  <Td num className={ratio !== null && ratio > 1 ? 'font-semibold text-danger-ink' : undefined}>{ratio === null ? '—' : formatSig(ratio, 2)}</Td>
                  {!exact && <Td className="text-xs">{q ? (q.included ? 'yes' : 'no, left out') : e.entry.isBaseline ? 'no: a reference row' : '—'}</Td>}
                </tr>
              );
            })}
          </tbody>
        </Table>
      </Panel>

      {hardware.length > 0 && (
        <Panel title="Zero-noise extrapolation" id="target-zne" description="Each hardware entry's values at the noise-scale factors it measured, its own extrapolated value, and Parallax's re-analysis of the same data with several models.">
          <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
            {hardware.map((e) => <ZneBlock key={e.entry.id} e={e} reference={exact ? exact.value : null} />)}
          </div>
        </Panel>
      )}

      <Neighbours slug={slug} t={t} />
    </div>
  );
}

function ReferencePanel({ t }: { t: TargetDetail }) {
  const r = t.reference;
  return (
    <Panel title="Exact reference" id="target-reference">
      {r.status === 'exact' ? (
        <div data-testid="reference">
          <p className="text-2xl"><Measured value={r.value} u={r.uncertainty} /></p>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-ink-soft">Method</dt><dd>{r.method}</dd>
            <dt className="text-ink-soft">Size</dt><dd className="num">{describeSize(r.size) || '—'}</dd>
            <dt className="text-ink-soft">Time</dt><dd className="num">{formatMs(r.wallMs)}</dd>
            <dt className="text-ink-soft">Engine</dt><dd>{r.engineVersion ?? '—'}</dd>
            <dt className="text-ink-soft">Computed</dt><dd className="num">{formatDateTime(r.createdAt)}</dd>
            <dt className="text-ink-soft">Cross-checks</dt><dd>{describeCrossCheck(r.size) || 'none recorded'}</dd>
          </dl>
        </div>
      ) : r.status === 'sealed' ? (
        <p>Sealed by the moderators until <span className="num">{formatDateTime(r.sealedUntil)}</span>: the value is published then, and scoring against it starts.</p>
      ) : r.status === 'none' ? (
        <p>No exact method reaches this target{r.reason ? <>: <span className="text-ink-soft">{r.reason}</span></> : ''}. It is scored against the consensus of the entries.</p>
      ) : (
        <p>Being computed.</p>
      )}
    </Panel>
  );
}

function ConsensusPanel({ t }: { t: TargetDetail }) {
  const c = t.consensus;
  return (
    <Panel title="Consensus" id="target-consensus" description={t.reference.status === 'exact' ? 'Shown for comparison: this target is scored against its exact reference.' : 'The value this target is scored against.'}>
      {!c || c.value === null ? <p className="text-ink-soft">No consensus yet (no published estimate at the last rescoring).</p> : (
        <div data-testid="consensus">
          <p className="text-2xl"><Measured value={c.value} u={c.uncertainty} /></p>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-ink-soft">Estimator</dt><dd>{estimatorName(c.estimator)}</dd>
            <dt className="text-ink-soft">Estimates</dt><dd className="num">{c.includedCount} of {c.entries} included</dd>
            <dt className="text-ink-soft" title="chi-squared per degree of freedom">χ² per degree of freedom</dt><dd className="num">{chiSquaredText(c.chi2, c.nu)}{c.p !== null && <span className="text-ink-soft"> (p = {formatSig(c.p, 2)})</span>}</dd>
            <dt className="text-ink-soft">Birge ratio</dt><dd className="num">{formatSig(c.birgeRatio, 3)}</dd>
            <dt className="text-ink-soft">τ (between-method spread)</dt><dd className="num">{c.tau2 === null ? '—' : formatSig(Math.sqrt(c.tau2), 2)}</dd>
            {c.I2 !== null && <><dt className="text-ink-soft">I²</dt><dd className="num">{formatSig(c.I2, 2)} %</dd></>}
            <dt className="text-ink-soft">Scored</dt><dd className="num">{formatDateTime(c.computedAt)} · {c.engineVersion}</dd>
          </dl>
        </div>
      )}
    </Panel>
  );
}

function ZneBlock({ e, reference }: { e: TargetEstimate; reference: number | null }) {
  const z = e.zne!;
  return (
    <div data-testid="zne-block">
      <h3 className="text-base font-semibold"><Link to={`/entries/${e.entry.id}`}>{e.entry.label}</Link> <span className="text-sm font-normal text-ink-soft">{e.entry.teamName}</span></h3>
      <Suspense fallback={<PageLoading label="Loading the chart…" />}>
        <ZneChart points={z.points} fits={z.fits} team={{ value: e.value, uncertainty: e.uncertainty }} reference={reference}
          label={`${e.entry.label}: ${z.points.length} noise-scaled values against the noise-scale factor, with the team's extrapolated value and ${z.fits.filter((f) => f.ok).length} re-fitted values at zero noise; the table below lists them`} />
      </Suspense>
      <table className="mt-2 w-full border-collapse text-sm">
        <caption className="sr-only">Noise-scaled values and fits of {e.entry.label}</caption>
        <thead><tr className="text-xs text-ink-soft"><th scope="col" className="border-b border-rule-strong py-1 text-left font-semibold">Model or factor</th><th scope="col" className="border-b border-rule-strong py-1 text-right font-semibold">Value</th><th scope="col" className="border-b border-rule-strong py-1 pl-4 text-right font-semibold">{reference !== null ? 'Error' : 'χ² per degree of freedom'}</th></tr></thead>
        <tbody>
          {z.points.map((p) => <tr key={`c${p.scale}`}><th scope="row" className="border-b border-rule py-1 text-left font-normal">c = <span className="num">{p.scale}</span></th><td className="num border-b border-rule py-1 pl-3 text-right">{formatMeasurement(p.value, p.uncertainty).text}</td><td className="border-b border-rule pl-4" /></tr>)}
          <tr className="bg-paper-sunk/60"><th scope="row" className="border-b border-rule py-1 text-left font-medium">the team&rsquo;s value</th><td className="num border-b border-rule py-1 pl-3 text-right">{formatMeasurement(e.value, e.uncertainty).text}</td><td className="num border-b border-rule py-1 pl-4 text-right">{reference !== null ? formatSig(e.value - reference, 2) : ''}</td></tr>
          {z.fits.map((f) => (
            <tr key={f.model}>
              <th scope="row" className="border-b border-rule py-1 text-left font-normal">{zneModelName(f.model)}</th>
              <td className="num border-b border-rule py-1 pl-3 text-right">{f.ok ? formatMeasurement(f.value, f.uncertainty).text : <span className="text-ink-soft">not fitted: {f.reason}</span>}</td>
              <td className="num border-b border-rule py-1 pl-4 text-right">{f.ok && f.value !== null ? (reference !== null ? formatSig(f.value - reference, 2) : chiSquaredText(f.chi2, f.nu)) : ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** the same observable at the neighbouring depths and angles */
function Neighbours({ slug, t }: { slug: string; t: TargetDetail }) {
  const steps = [...new Set(t.siblings.map((s) => s.steps ?? 0))].sort((a, b) => a - b);
  const thetas = [...new Set(t.siblings.map((s) => s.thetaH ?? 0))].sort((a, b) => a - b);
  const at = new Map(t.siblings.map((s) => [`${s.steps}|${s.thetaH}`, s.key]));
  const si = steps.indexOf(t.params.steps ?? 0), ti = thetas.indexOf(t.params.thetaH ?? 0);
  const near = (i: number, n: number) => Array.from({ length: n }, (_, k) => k).filter((k) => Math.abs(k - i) <= 2);
  const ss = near(si, steps.length), tt = near(ti, thetas.length);
  const href = (k: string) => `/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(k)}`;
  return (
    <Panel title="Neighbouring targets" id="target-neighbours" description={<>The same observable <code>{t.observable.key}</code> at nearby depths (rows) and angles (columns).</>}>
      <Table aria-label="Neighbouring targets" data-testid="neighbours">
        <thead><tr><Th>Steps</Th>{tt.map((k) => <Th key={k} num>θ<sub>h</sub> = {formatAngle(thetas[k])}</Th>)}</tr></thead>
        <tbody>
          {ss.map((i) => (
            <tr key={steps[i]}>
              <Th scope="row" className="normal-case">{steps[i]}</Th>
              {tt.map((k) => {
                const key = at.get(`${steps[i]}|${thetas[k]}`);
                const here = i === si && k === ti;
                return <Td key={k} num>{!key ? '—' : here ? <strong aria-current="page">this target</strong> : <Link to={href(key)} aria-label={`target ${key}`}>{steps[i]} · {formatAngle(thetas[k])}</Link>}</Td>;
              })}
            </tr>
          ))}
        </tbody>
      </Table>
    </Panel>
  );
}
