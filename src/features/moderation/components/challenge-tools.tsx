/**
 * One challenge's moderation tools: settings, sealed references (blind rounds), disputed targets
 * and curation of its published entries (feature, hide with a public reason).
 */
import { useMemo, useState } from 'react';
import { CONSENSUS_ESTIMATORS } from '@shared/scoring/consensus';
import { PRIMARY_METRICS } from '@shared/scoring/standings';
import { ApiError, errorMessage } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useTargets } from '@/features/challenges/api/get-targets';
import { Badge, Button, Field, FormMessage, Panel, SelectField, Spinner, Table, Td, Th, TrackBadge, inputClass } from '@/components/ui';
import { useUpdateSettings, type SettingsPatch } from '../api/update-settings';
import { useSealReferences } from '../api/seal-references';
import { useDisputeTarget } from '../api/dispute-target';
import { useChallengeEntries } from '../api/get-challenge-entries';
import { useCurateEntry, type CurationResult } from '../api/curate-entry';
import { TRACKS } from '@shared/vocabulary';

const toLocal = (iso: string | null | undefined) => (iso ? new Date(iso).toISOString().slice(0, 16) : '');
const fromLocal = (v: string) => (v ? new Date(`${v}:00Z`).toISOString() : null);

export function SettingsForm({ c }: { c: ChallengeDetail }) {
  const s = c.settings as ChallengeDetail['settings'] & { submissionWindow?: { opensAt?: string | null; closesAt?: string | null } | null };
  const [estimator, setEstimator] = useState(s.estimator ?? '');
  const [metric, setMetric] = useState(s.primaryMetric ?? '');
  const [tracks, setTracks] = useState<string[]>(s.tracks ?? [...TRACKS]);
  const [opens, setOpens] = useState(toLocal(s.submissionWindow?.opensAt));
  const [closes, setCloses] = useState(toLocal(s.submissionWindow?.closesAt));
  const [license, setLicense] = useState(s.license ?? '');
  const [state, setState] = useState(c.state === 'closed' ? 'closed' : 'open');
  const [reason, setReason] = useState('');
  const m = useUpdateSettings(c.slug);
  const err = (p: string) => (m.error instanceof ApiError ? m.error.problemFor(p) : undefined);
  const patch = (): SettingsPatch => {
    const out: SettingsPatch = {};
    if (estimator && estimator !== s.estimator) out.estimator = estimator;
    if (metric && metric !== s.primaryMetric) out.primaryMetric = metric;
    if (JSON.stringify(tracks) !== JSON.stringify(s.tracks ?? TRACKS)) out.tracks = tracks;
    if (opens !== toLocal(s.submissionWindow?.opensAt) || closes !== toLocal(s.submissionWindow?.closesAt)) out.submissionWindow = opens || closes ? { opensAt: fromLocal(opens), closesAt: fromLocal(closes) } : null;
    if (license && license !== s.license) out.license = license;
    if (state !== (c.state === 'closed' ? 'closed' : 'open') && c.state !== 'draft') out.state = state as 'open' | 'closed';
    if (reason.trim()) out.reason = reason.trim();
    return out;
  };
  return (
    <Panel title="Settings" id="settings">
      <form className="space-y-4" onSubmit={(e) => { e.preventDefault(); m.mutate(patch()); }}>
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField label="Consensus estimator" value={estimator} onChange={(e) => setEstimator(e.target.value)} error={err('/estimator')}>
            {!s.estimator && <option value="">(default)</option>}
            {CONSENSUS_ESTIMATORS.map((x) => <option key={x} value={x}>{x}</option>)}
          </SelectField>
          <SelectField label="Primary metric of the standings" value={metric} onChange={(e) => setMetric(e.target.value)} error={err('/primaryMetric')}>
            {!s.primaryMetric && <option value="">(default)</option>}
            {PRIMARY_METRICS.map((x) => <option key={x} value={x}>{x}</option>)}
          </SelectField>
          <fieldset className="min-w-0">
            <legend className="text-sm font-medium">Tracks</legend>
            <div className="mt-2 flex flex-wrap gap-x-4 gap-y-2">
              {TRACKS.map((t) => (
                <label key={t} className="flex items-center gap-2 text-sm">
                  <input type="checkbox" checked={tracks.includes(t)} onChange={(e) => setTracks((ts) => (e.target.checked ? [...ts.filter((x) => x !== t), t].sort() : ts.filter((x) => x !== t)))} />
                  <TrackBadge track={t} />
                </label>
              ))}
            </div>
            {err('/tracks') && <p className="mt-1 text-sm text-danger">{err('/tracks')}</p>}
          </fieldset>
          <SelectField label="Submissions" value={state} onChange={(e) => setState(e.target.value)} disabled={c.state === 'draft'} hint={c.state === 'draft' ? 'Publish the challenge first.' : undefined}>
            <option value="open">open</option>
            <option value="closed">closed</option>
          </SelectField>
          <Field label="Window opens (UTC)" type="datetime-local" value={opens} onChange={(e) => setOpens(e.target.value)} error={err('/submissionWindow/opensAt')} />
          <Field label="Window closes (UTC)" type="datetime-local" value={closes} onChange={(e) => setCloses(e.target.value)} error={err('/submissionWindow/closesAt') ?? err('/submissionWindow')} />
          <Field label="Licence of the entries' data" value={license} onChange={(e) => setLicense(e.target.value)} error={err('/license')} />
          <Field label="Reason (audit log)" value={reason} onChange={(e) => setReason(e.target.value)} hint="Recorded with the change; say why when the standings will change." />
        </div>
        {m.isError && !(m.error instanceof ApiError && m.error.problems.some((p) => p.path)) && <FormMessage>{errorMessage(m.error)}</FormMessage>}
        {m.isSuccess && <FormMessage tone="ok">{m.data.changed.length ? `Saved: ${m.data.changed.join(', ')}.` : 'Nothing changed.'}{m.data.jobId && ' The standings are being recomputed.'}</FormMessage>}
        <Button type="submit" busy={m.isPending}>Save settings</Button>
      </form>
    </Panel>
  );
}

export function SealForm({ slug, targetKeys }: { slug: string; targetKeys: string[] }) {
  const [which, setWhich] = useState<'all' | 'some'>('all');
  const [list, setList] = useState('');
  const [until, setUntil] = useState('');
  const m = useSealReferences(slug);
  const chosen = list.split(/[\s,]+/).filter(Boolean);
  const unknown = chosen.filter((k) => !targetKeys.includes(k));
  return (
    <Panel title="Seal references" description="A blind round: reference values stay hidden (from the public and from the score preview) until the date." id="seal">
      <form className="space-y-3" onSubmit={(e) => { e.preventDefault(); const u = fromLocal(until); if (u) m.mutate({ targets: which === 'all' ? 'all' : chosen, until: u }); }}>
        <div className="flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-2"><input type="radio" name="seal-which" checked={which === 'all'} onChange={() => setWhich('all')} /> All {targetKeys.length} targets</label>
          <label className="flex items-center gap-2"><input type="radio" name="seal-which" checked={which === 'some'} onChange={() => setWhich('some')} /> Chosen targets</label>
        </div>
        {which === 'some' && (
          <div>
            <label className="text-sm font-medium" htmlFor="seal-list">Target keys (one per line, or separated by commas)</label>
            <textarea id="seal-list" rows={3} value={list} onChange={(e) => setList(e.target.value)} className={inputClass(unknown.length > 0, 'font-mono text-xs')} placeholder="t4-h0.785398:z29" />
            {unknown.length > 0 && <p className="text-sm text-danger">Not targets of this version: {unknown.slice(0, 5).join(', ')}{unknown.length > 5 && '…'}</p>}
          </div>
        )}
        <Field label="Sealed until (UTC)" type="datetime-local" required value={until} onChange={(e) => setUntil(e.target.value)} wrapperClassName="max-w-xs" error={m.error instanceof ApiError ? m.error.problemFor('/until') : undefined} />
        {m.isError && <FormMessage>{errorMessage(m.error)}</FormMessage>}
        {m.isSuccess && <FormMessage tone="ok">Sealed {m.data.targets} targets until {formatDateTime(m.data.sealedUntil)} ({m.data.referencesSealedNow} computed values hidden now, {m.data.pendingReferences} sealed when written).</FormMessage>}
        <Button type="submit" busy={m.isPending} disabled={!until || (which === 'some' && (!chosen.length || unknown.length > 0))}>Seal</Button>
      </form>
    </Panel>
  );
}

export function Disputes({ slug }: { slug: string }) {
  const t = useTargets(slug);
  const m = useDisputeTarget(slug);
  const [filter, setFilter] = useState('');
  const [editing, setEditing] = useState<string | null>(null);
  const [note, setNote] = useState('');
  const rows = useMemo(() => {
    const all = t.data?.targets ?? [];
    const f = filter.trim();
    return [...all.filter((x) => x.disputed), ...all.filter((x) => !x.disputed && (f ? x.key.includes(f) : false))].slice(0, 40);
  }, [t.data, filter]);
  return (
    <Panel title="Disputed targets" description="A disputed target is marked open on the public pages, with your note; its consensus is not trusted." id="disputes">
      {t.isPending ? <Spinner /> : (
        <div className="space-y-3">
          <input aria-label="Find a target" placeholder="find a target, e.g. t4-h0.785398:z29" value={filter} onChange={(e) => setFilter(e.target.value)} className={inputClass(false, 'w-full max-w-sm font-mono text-xs', true)} />
          {rows.length === 0 ? <p className="text-sm text-ink-soft">No target is disputed. Find one above to dispute it.</p> : (
            <Table>
              <thead><tr><Th>Target</Th><Th>Reference</Th><Th>Status</Th><Th><span className="sr-only">Action</span></Th></tr></thead>
              <tbody>
                {rows.map((x) => (
                  <tr key={x.key}>
                    <Td className="font-mono text-xs">{x.key}</Td>
                    <Td className="text-xs">{x.reference.status}</Td>
                    <Td>{x.disputed ? <span className="space-y-1"><Badge tone="disputed">disputed</Badge>{x.disputeNote && <span className="block text-xs text-ink-soft">{x.disputeNote}</span>}</span> : <span className="text-xs text-ink-soft">—</span>}</Td>
                    <Td className="text-right">
                      {x.disputed ? (
                        <Button size="sm" variant="secondary" busy={m.isPending && m.variables?.targetKey === x.key} onClick={() => m.mutate({ targetKey: x.key, disputed: false })}>Clear</Button>
                      ) : editing === x.key ? (
                        <form className="flex flex-wrap justify-end gap-2" onSubmit={(e) => { e.preventDefault(); m.mutate({ targetKey: x.key, disputed: true, note: note.trim() }, { onSuccess: () => { setEditing(null); setNote(''); } }); }}>
                          <input aria-label={`Public note for ${x.key}`} required autoFocus placeholder="why (public)" value={note} onChange={(e) => setNote(e.target.value)} className={inputClass(false, 'w-48', true)} />
                          <Button size="sm" type="submit" disabled={!note.trim()}>Dispute</Button>
                        </form>
                      ) : (
                        <Button size="sm" variant="secondary" onClick={() => { setEditing(x.key); setNote(''); }}>Dispute…</Button>
                      )}
                    </Td>
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
          {m.isError && <FormMessage>{errorMessage(m.error)}</FormMessage>}
        </div>
      )}
    </Panel>
  );
}

export function Curation({ slug }: { slug: string }) {
  const q = useChallengeEntries(slug);
  const m = useCurateEntry(slug);
  // the list says which are featured or hidden; what we set here is remembered until it is read again
  const [known, setKnown] = useState<Record<string, CurationResult>>({});
  const [hiding, setHiding] = useState<string | null>(null);
  const [reason, setReason] = useState('');
  const run = (entryId: string, body: Parameters<typeof m.mutate>[0]['body']) => m.mutate({ entryId, body }, { onSuccess: (r) => { setKnown((k) => ({ ...k, [entryId]: r })); setHiding(null); setReason(''); } });
  return (
    <Panel title="Published entries" description="Feature an entry (it is marked on the public pages), or hide it with a public reason (it leaves the standings)." id="curation">
      {q.isPending ? <Spinner /> : q.isError ? <FormMessage>{errorMessage(q.error)}</FormMessage> : q.data.entries.length === 0 ? <p className="text-sm text-ink-soft">No published entries yet.</p> : (
        <ul className="divide-y divide-rule">
          {q.data.entries.map((e) => {
            const k = known[e.id];
            const featured = k?.featured ?? e.featured ?? false;
            const hidden = k ? k.hiddenReason : e.hidden?.reason ?? null;
            return (
              <li key={e.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                <span className="min-w-0">
                  <span className="font-medium">{e.label}</span> <span className="text-sm text-ink-soft">{e.team.name}</span>{' '}
                  {featured && <Badge tone="ok">featured</Badge>} {hidden && <Badge tone="danger">hidden: {hidden}</Badge>}
                </span>
                {hiding === e.id ? (
                  <form className="flex flex-wrap gap-2" onSubmit={(ev) => { ev.preventDefault(); run(e.id, { hidden: { reason: reason.trim() } }); }}>
                    <input aria-label={`Public reason for hiding ${e.label}`} autoFocus required value={reason} onChange={(ev) => setReason(ev.target.value)} placeholder="why (public)" className={inputClass(false, 'w-56', true)} />
                    <Button size="sm" variant="danger" type="submit" disabled={!reason.trim()}>Hide</Button>
                    <Button size="sm" variant="ghost" onClick={() => setHiding(null)}>Cancel</Button>
                  </form>
                ) : (
                  <span className="flex gap-2">
                    <Button size="sm" variant="secondary" busy={m.isPending && m.variables?.entryId === e.id} onClick={() => run(e.id, { featured: !featured })}>{featured ? 'Unfeature' : 'Feature'}</Button>
                    {hidden ? <Button size="sm" variant="secondary" onClick={() => run(e.id, { hidden: null })}>Show again</Button> : <Button size="sm" variant="ghost" onClick={() => { setHiding(e.id); setReason(''); }}>Hide…</Button>}
                  </span>
                )}
              </li>
            );
          })}
        </ul>
      )}
      {m.isError && <div className="mt-2"><FormMessage>{errorMessage(m.error)}</FormMessage></div>}
    </Panel>
  );
}
