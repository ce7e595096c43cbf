/**
 * A team's entries in every state, with the actions each state allows: edit and submit a draft or
 * a returned entry, delete a draft, withdraw (with a reason) anything submitted, revise a published one. A returned entry shows the
 * moderator's reason.
 */
import { useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { errorMessage } from '@/lib/api-client';
import { formatDateTime, formatPercent } from '@/lib/format';
import { useEntry } from '@/features/entries/api/get-entry';
import type { TeamEntry } from '@/features/entries/api/get-team-entries';
import { useTeamEntries } from '@/features/entries/api/get-team-entries';
import type { MeTeam } from '@/features/me/api/get-me';
import { Badge, Button, ButtonLink, EmptyState, ErrorState, Panel, Spinner, TrackBadge, cx, inputClass, type BadgeTone } from '@/components/ui';
import { useEntryAction } from '../api/entry-actions';

const STATE_TONE: Record<string, BadgeTone> = { draft: 'neutral', 'in-review': 'consensus', returned: 'danger', published: 'ok', rejected: 'danger', withdrawn: 'neutral', superseded: 'neutral' };
const STATE_LABEL: Record<string, string> = { 'in-review': 'in review' };

export function StateBadge({ state }: { state: string }) {
  return <Badge tone={STATE_TONE[state] ?? 'neutral'}>{STATE_LABEL[state] ?? state}</Badge>;
}

function ReturnedReason({ entryId }: { entryId: string }) {
  const q = useEntry(entryId);
  const last = [...(q.data?.history ?? [])].reverse().find((h) => h.action === 'entry.review' && h.reason);
  if (!last) return null;
  return <p className="mt-1 text-sm text-danger-ink" data-testid="returned-reason">Returned: “{last.reason}”</p>;
}

function EntryRow({ e, teamId }: { e: TeamEntry; teamId: string }) {
  const act = useEntryAction();
  const navigate = useNavigate();
  const [withdrawing, setWithdrawing] = useState(false);
  const [deleting, setDeleting] = useState(false);
  const [reason, setReason] = useState('');
  const editable = e.state === 'draft' || e.state === 'returned';
  const editHref = `/challenges/${e.challenge.slug}/submit?entry=${e.id}`;
  return (
    <li className="py-3" data-testid={`entry-${e.id}`}>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <p className="flex flex-wrap items-center gap-2">
            <Link to={editable ? editHref : `/entries/${e.id}`} className="font-medium">{e.label || 'Untitled entry'}</Link>
            <StateBadge state={e.state} />
            <TrackBadge track={e.track} />
            {e.revision > 1 && <span className="text-xs text-ink-soft">revision {e.revision}</span>}
          </p>
          <p className="mt-0.5 text-sm text-ink-soft">
            <Link to={`/challenges/${e.challenge.slug}`}>{e.challenge.slug}</Link> v{e.challenge.version} · {e.estimates} estimates ({formatPercent(e.coverage.fraction)} of the targets) · updated {formatDateTime(e.updatedAt)}
          </p>
          {e.state === 'returned' && <ReturnedReason entryId={e.id} />}
          {e.problems && e.problems.length > 0 && <p className="mt-1 text-sm text-danger-ink" data-testid="draft-problems">Saved with {e.problems.length === 1 ? 'one problem' : `${e.problems.length} problems`}: fix {e.problems.length === 1 ? 'it' : 'them'} (Edit) before submitting.</p>}
        </div>
        <div className="flex flex-wrap gap-2">
          {editable && <ButtonLink size="sm" to={editHref}>Edit</ButtonLink>}
          {editable && !e.problems?.length && <Button size="sm" busy={act.isPending && act.variables?.action === 'submit'} onClick={() => act.mutate({ action: 'submit', entryId: e.id, teamId })}>Submit for review</Button>}
          {e.state === 'published' && (
            <Button size="sm" variant="secondary" busy={act.isPending && act.variables?.action === 'revise'}
              onClick={() => act.mutate({ action: 'revise', entryId: e.id, teamId }, { onSuccess: (r) => navigate(`/challenges/${e.challenge.slug}/submit?entry=${r.id}`) })}>
              Revise
            </Button>
          )}
          {e.state !== 'draft' && !['withdrawn', 'rejected', 'superseded'].includes(e.state) && !withdrawing && <Button size="sm" variant="ghost" onClick={() => setWithdrawing(true)}>Withdraw…</Button>}
          {e.state === 'draft' && !deleting && <Button size="sm" variant="ghost" onClick={() => setDeleting(true)}>Delete…</Button>}
        </div>
      </div>
      {withdrawing && (
        <form
          className="mt-2 flex flex-wrap items-center gap-2"
          onSubmit={(ev) => { ev.preventDefault(); act.mutate({ action: 'withdraw', entryId: e.id, teamId, reason }, { onSuccess: () => setWithdrawing(false) }); }}
        >
          <input aria-label="Reason for withdrawing" required placeholder="Why is it withdrawn? (shown with the entry)" value={reason} onChange={(ev) => setReason(ev.target.value)} className={inputClass(false, 'min-w-0 flex-1 sm:max-w-md', true)} />
          <Button size="sm" variant="danger" type="submit" busy={act.isPending} disabled={!reason.trim()}>Withdraw</Button>
          <Button size="sm" variant="ghost" onClick={() => setWithdrawing(false)}>Cancel</Button>
        </form>
      )}
      {deleting && (
        <div className="mt-2 flex flex-wrap items-center gap-2" role="group" aria-label="Delete this draft">
          <span className="text-sm">Delete this draft and its estimates? This cannot be undone.</span>
          <Button size="sm" variant="danger" busy={act.isPending && act.variables?.action === 'delete'} onClick={() => act.mutate({ action: 'delete', entryId: e.id, teamId }, { onSuccess: () => setDeleting(false) })}>Delete draft</Button>
          <Button size="sm" variant="ghost" onClick={() => setDeleting(false)}>Cancel</Button>
        </div>
      )}
      {act.isError && <p className="mt-1 text-sm text-danger" role="alert">{errorMessage(act.error)}</p>}
    </li>
  );
}

export function TeamEntries({ team }: { team: MeTeam }) {
  const q = useTeamEntries(team.id);
  return (
    <Panel title={team.name} description={`You are ${team.role === 'lead' ? 'the lead' : 'a member'} of this team.`} id={`team-${team.id}`}>
      {q.isPending ? <Spinner /> : q.isError ? <ErrorState error={q.error} retry={() => q.refetch()} /> : q.data.entries.length === 0 ? (
        <EmptyState title="No entries yet">Open a challenge and choose Submit to start one.</EmptyState>
      ) : (
        <ul className={cx('divide-y divide-rule')}>{q.data.entries.map((e) => <EntryRow key={e.id} e={e} teamId={team.id} />)}</ul>
      )}
    </Panel>
  );
}
