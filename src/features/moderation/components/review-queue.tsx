/**
 * The review queue: entries in review, oldest first, each with its automatic-check badges; the
 * selected one (?entry=) opens beside the list on a wide screen and below it on a phone, with the
 * checks in detail, the method as submitted and the decision form.
 */
import { useEffect, useRef, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { formatDateTime, formatMeasurement, formatMetric, formatPercent, formatSig } from '@/lib/format';
import { useEntry } from '@/features/entries/api/get-entry';
import { Badge, EmptyState, ErrorState, FormMessage, Panel, Spinner, TrackBadge, cx } from '@/components/ui';
import { useQueue, type QueueItem } from '../api/get-queue';
import { StatGrid } from '@/features/submit/components/stat-grid';
import { CheckBadges } from './check-badges';
import { DecisionForm } from './decision-form';

export function ReviewQueue() {
  const q = useQueue();
  const [search, setSearch] = useSearchParams();
  const selected = search.get('entry');
  const [notice, setNotice] = useState<{ tone: 'ok' | 'danger'; text: string } | null>(null);
  const detail = useRef<HTMLDivElement>(null);
  // on a narrow screen the detail is below the list: bring it into view when an entry is chosen
  useEffect(() => {
    if (selected && window.matchMedia('(max-width: 1023px)').matches) detail.current?.scrollIntoView({ block: 'start' });
  }, [selected]);
  const select = (id: string | null) => setSearch((s) => { if (id) s.set('entry', id); else s.delete('entry'); return s; }, { replace: false });

  if (q.isPending) return <Spinner />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  const items = q.data.entries;
  const item = items.find((i) => i.id === selected) ?? null;

  return (
    <div className="space-y-4">
      {notice && <FormMessage tone={notice.tone}>{notice.text}</FormMessage>}
      {items.length === 0 ? (
        <EmptyState title="Nothing to review">Entries sent for review appear here with their automatic checks.</EmptyState>
      ) : (
        <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
          <ul className="divide-y divide-rule self-start rounded-card border border-rule bg-paper-raised" data-testid="review-queue" aria-label="Entries in review">
            {items.map((i) => (
              <li key={i.id}>
                <button
                  type="button"
                  onClick={() => { setNotice(null); select(i.id); }}
                  aria-current={i.id === selected ? 'true' : undefined}
                  className={cx('block w-full px-4 py-3 text-left hover:bg-paper-sunk', i.id === selected && 'bg-paper-sunk shadow-[inset_3px_0_0_0_currentColor]')}
                  data-testid={`queue-item-${i.id}`}
                >
                  <span className="flex flex-wrap items-center gap-2">
                    <span className="font-medium">{i.label}</span>
                    {i.revision > 1 && <Badge>revision {i.revision}</Badge>}
                  </span>
                  <span className="mt-0.5 block text-sm text-ink-soft">{i.team.name} · {i.challenge.slug} v{i.challenge.version} · {formatDateTime(i.submittedAt)}</span>
                  <span className="mt-1.5 block"><CheckBadges item={i} /></span>
                </button>
              </li>
            ))}
          </ul>
          <div className="min-w-0 scroll-mt-20" ref={detail}>
            {item ? (
              <EntryReview
                key={item.id}
                item={item}
                onDecided={(d) => { setNotice({ tone: 'ok', text: `${item.label}: ${d === 'publish' ? 'published' : d === 'return' ? 'returned to the team' : 'rejected'}.` }); select(null); }}
                onConflict={(message) => { setNotice({ tone: 'danger', text: `${message.replace(/;?\s*reload the queue\.?$/i, '.').replace(/\d{4}-\d\d-\d\dT[\d:.]+Z/g, (iso) => formatDateTime(iso))} The queue below is up to date.` }); select(null); }}
              />
            ) : selected ? (
              <EmptyState title="This entry is no longer in review">It was decided or withdrawn meanwhile. <Link to={`/entries/${selected}`}>Open the entry</Link></EmptyState>
            ) : (
              <p className="hidden text-sm text-ink-soft lg:block">Choose an entry to review it.</p>
            )}
          </div>
        </div>
      )}
    </div>
  );
}

function EntryReview({ item, onDecided, onConflict }: { item: QueueItem; onDecided: (d: 'publish' | 'return' | 'reject') => void; onConflict: (m: string) => void }) {
  const c = item.checks;
  const e = useEntry(item.id);
  const doc = e.data?.document;
  return (
    <div className="space-y-4" data-testid="entry-review">
      <Panel
        title={item.label}
        description={<>{item.team.name} · <Link to={`/challenges/${item.challenge.slug}`}>{item.challenge.slug}</Link> v{item.challenge.version} · submitted {formatDateTime(item.submittedAt)}</>}
        actions={<TrackBadge track={item.track} />}
      >
        <div className="space-y-4">
          <CheckBadges item={item} />
          <StatGrid testId="review-scores" items={[
            ['Coverage', `${c.coverage.answered}/${c.coverage.targets}`],
            ['Scored', `${c.scores.scored}/${c.scores.exactReferences}`],
            ['RMSE', formatMetric(c.scores.rmse)],
            ['Max |error|', formatMetric(c.scores.maxAbsError)],
            ['Mean z²', formatMetric(c.scores.meanZ2)],
            ['Within 2u', formatPercent(c.scores.fractionCovered)],
          ]} />
          {c.schema.problems.length > 0 && (
            <CheckList title="Invalid estimates">{c.schema.problems.map((p) => <li key={p.target + p.message}><code className="text-xs">{p.target}</code> {p.message}</li>)}</CheckList>
          )}
          {c.bounds.targets.length > 0 && (
            <CheckList title={`Outside the physical bounds (${c.bounds.count})`}>
              {c.bounds.targets.map((b) => <li key={b.target}><code className="text-xs">{b.target}</code> {formatMeasurement(b.value, b.uncertainty).text}, bound {formatSig(b.bound)}{b.beyondThreeSigma && <> · <strong>beyond 3σ</strong></>}</li>)}
            </CheckList>
          )}
          {c.outliers.targets.length > 0 && (
            <CheckList title={`Outliers against the consensus (${c.outliers.count} of ${c.outliers.compared} compared)`}>
              {c.outliers.targets.map((o) => <li key={o.target}><code className="text-xs">{o.target}</code> {formatMeasurement(o.value, o.uncertainty).text} vs consensus {formatSig(o.consensus, 4)}: d = {formatSig(o.d, 2)}, U = {formatSig(o.U, 2)}</li>)}
            </CheckList>
          )}
          {c.identical.length > 0 && (
            <CheckList title="Identical values to other entries">
              {c.identical.map((d) => (
                <li key={d.entryId}>
                  <Link to={`/entries/${d.entryId}`}>{d.label}</Link> ({d.team}{d.isBaseline ? ', house baseline' : ''}, {d.state}): {d.targets} targets, e.g. <code className="text-xs">{d.examples.slice(0, 3).join(', ')}</code>
                </li>
              ))}
            </CheckList>
          )}
        </div>
      </Panel>

      <Panel title="As submitted">
        {e.isPending ? <Spinner /> : e.isError ? <ErrorState error={e.error} /> : (
          <div className="space-y-3 text-sm">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
              <dt className="text-ink-soft">Method</dt><dd>{doc?.method?.family}{doc?.method?.description && <> — {doc.method.description}</>}</dd>
              {doc?.method?.settings && <><dt className="text-ink-soft">Settings</dt><dd className="font-mono text-xs break-all">{Object.entries(doc.method.settings).map(([k, v]) => `${k} = ${JSON.stringify(v)}`).join(' · ')}</dd></>}
              {doc?.resources && <><dt className="text-ink-soft">Resources</dt><dd className="font-mono text-xs break-all">{Object.entries(doc.resources).map(([k, v]) => `${k} = ${typeof v === 'object' ? JSON.stringify(v) : String(v)}`).join(' · ')}</dd></>}
              {doc?.links && <><dt className="text-ink-soft">Links</dt><dd className="break-all">{Object.values(doc.links).join(' · ')}</dd></>}
              {doc?.license && <><dt className="text-ink-soft">Licence</dt><dd>{doc.license}</dd></>}
            </dl>
            {(e.data?.history ?? []).filter((h) => h.reason).length > 0 && (
              <CheckList title="Earlier decisions">
                {(e.data?.history ?? []).filter((h) => h.reason).map((h, i) => <li key={i}>{formatDateTime(h.at)} · {h.action}: “{h.reason}”</li>)}
              </CheckList>
            )}
            <Link to={`/entries/${item.id}`}>All {e.data?.estimates} estimates on the entry page</Link>
          </div>
        )}
      </Panel>

      <Panel title="Decision">
        <DecisionForm entryId={item.id} onDecided={onDecided} onConflict={onConflict} />
      </Panel>
    </div>
  );
}

function CheckList({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <div>
      <h3 className="text-sm font-semibold">{title}</h3>
      <ul className="mt-1 list-disc space-y-0.5 pl-5 text-sm">{children}</ul>
    </div>
  );
}
