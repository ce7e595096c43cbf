import { endOfLocalDay } from '@/lib/format-time';
import { Link, useSearchParams } from 'react-router';
import { METRIC_LABEL, useStandings } from '@/features/standings/api/get-standings';
import { formatDateTime } from '@/lib/format';
import { EmptyState, ErrorState, PageLoading, Panel, Provenance, ProvenanceList, Segmented, Spinner, TrackMark, inputClass } from '@/components/ui';
import { StandingsTable } from './standings-table';

/** reads and writes the standings controls in the URL: ?track=&metric=&asOf= */
export function useStandingsParams() {
  const [params, setParams] = useSearchParams();
  const q = { track: params.get('track') ?? 'all', metric: params.get('metric') ?? '', asOf: params.get('asOf') ?? '' };
  const set = (k: 'track' | 'metric' | 'asOf', v: string) =>
    setParams((p) => {
      const n = new URLSearchParams(p);
      if (v && !(k === 'track' && v === 'all')) n.set(k, v);
      else n.delete(k);
      return n;
    }, { replace: true });
  return { q, set };
}

export function StandingsSection({ slug }: { slug: string }) {
  const { q, set } = useStandingsParams();
  const s = useStandings(slug, { track: q.track, metric: q.metric || undefined, asOf: q.asOf ? endOfLocalDay(q.asOf) : undefined });
  const d = s.data;
  return (
    <Panel
      title="Standings"
      id="standings"
      description={d?.counts ? <span className="num">{d.counts.entries} entries · {d.counts.verifiable} verifiable and {d.counts.unverifiable} unverifiable targets{d.counts.disputed ? ` · ${d.counts.disputed} disputed` : ''}</span> : 'Ranked by the chosen metric'}
      actions={s.isFetching && !s.isPending ? <Spinner size="sm" label="Updating…" /> : undefined}
    >
      <div className="mb-4 flex flex-wrap items-end gap-x-5 gap-y-3 text-sm">
        <div>
          <span className="mb-1 block text-xs text-ink-soft">Track</span>
          <Segmented
            label="Track"
            value={q.track}
            onChange={(v) => set('track', v)}
            options={[
              { value: 'all', label: 'both' },
              { value: 'hardware', label: <span className="inline-flex items-center gap-1"><TrackMark track="hardware" size={10} className="text-current" />hardware</span> },
              { value: 'classical', label: <span className="inline-flex items-center gap-1"><TrackMark track="classical" size={10} className="text-current" />classical</span> },
            ]}
          />
        </div>
        <label>
          <span className="mb-1 block text-xs text-ink-soft">Rank by</span>
          <select aria-label="Rank by metric" value={q.metric || d?.metric || ''} onChange={(e) => set('metric', e.target.value)} className={inputClass(false, 'pr-7', true)}>
            {(d?.metrics ?? Object.keys(METRIC_LABEL)).map((m) => <option key={m} value={m}>{METRIC_LABEL[m] ?? m}</option>)}
          </select>
        </label>
        <label>
          <span className="mb-1 block text-xs text-ink-soft">As of</span>
          <span className="flex items-center gap-1">
            <input type="date" aria-label="Standings as of date" value={q.asOf.slice(0, 10)} onChange={(e) => set('asOf', e.target.value)} className={inputClass(false, '', true)} />
            {q.asOf && <button type="button" className="text-xs underline" onClick={() => set('asOf', '')}>now</button>}
          </span>
        </label>
        {d && d.status === 'rescoring' && <span className="ml-auto text-xs text-disputed-ink">scoring rules changed ({d.scoringRulesVersion} → {d.currentScoringRulesVersion}): these standings are being recomputed</span>}
        {d && d.status === 'ready' && (
          <span className="ml-auto text-xs text-ink-soft">
            computed {formatDateTime(d.computedAt)}
            <Provenance label="How the standings were computed">
              <ProvenanceList items={[['Engine', d.engineVersion ?? '—'], ['Scoring rules', d.scoringRulesVersion ?? '—'], ['Computed', formatDateTime(d.computedAt)], ['Consensus', d.estimator ?? '—'], ['Rank intervals', d.bootstrapReplicates ? `${d.bootstrapReplicates} bootstrap resamples` : '—'], ['Version', `v${d.version}`], ['As of', d.asOf ? formatDateTime(d.asOf) : 'now']]} />
              <p className="mt-2 text-ink-soft">Ranked on proper scores (lower is better): CRPS against exact references, CRPS averaged over the consensus elsewhere; a missing answer scores the worst case. <Link to="/scoring">How scoring works</Link>.</p>
            </Provenance>
          </span>
        )}
      </div>
      {s.isPending ? (
        <PageLoading label="Loading the standings…" />
      ) : s.isError ? (
        <ErrorState error={s.error} retry={() => s.refetch()} />
      ) : d!.status === 'pending' ? (
        <EmptyState title="The standings are being computed">
          <span className="inline-flex items-center gap-2"><Spinner size="sm" label="" />The server scores every entry in the background; this page looks again every few seconds.</span>
        </EmptyState>
      ) : d!.entries.length === 0 ? (
        <EmptyState title={q.asOf ? 'No standings at that date' : 'No entries yet'}>
          {q.asOf ? 'Choose a later date, or clear the date to see the current standings.' : q.track !== 'all' ? 'No published entry in this track yet.' : 'When entries are published they are ranked here.'}
        </EmptyState>
      ) : (
        <StandingsTable entries={d!.entries} metric={d!.metric} slug={slug} />
      )}
      <p className="mt-3 text-xs text-ink-soft">
        Rank: the order by the score, with its 95% interval from a bootstrap over targets. Score: the mean proper score over the ranked targets (lower is better; a ranked target not answered counts as the worst case, 2 × the observable's bound). Answered: ranked targets answered of those ranked. Shown, not ranked: RMSE, max error, mean z², covered (|x − r| ≤ 2u, exact within {d?.exactTolerance ?? 1e-10} × bound) and the median |d|/U against the consensus. The house baseline is a reference row. <Link to="/scoring">How scoring works</Link> (rules {d?.scoringRulesVersion ?? d?.currentScoringRulesVersion ?? ''}).
      </p>
    </Panel>
  );
}
