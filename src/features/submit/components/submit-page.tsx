/**
 * Submitting an entry to one challenge: start from a file (dropped or chosen; sent as it is to
 * the dry run) or type the estimates into the table, describe the method, check (the dry run:
 * errors beside the fields they name, warnings apart, a score preview), save a draft, submit.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { ApiError, errorMessage } from '@/lib/api-client';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import type { Target } from '@/features/challenges/api/get-targets';
import type { Entry } from '@/features/entries/api/get-entry';
import type { MeTeam } from '@/features/me/api/get-me';
import { Badge, Button, FormMessage, PageHeader, Panel, SelectField, cx } from '@/components/ui';
import { useValidateEntry, type ValidateResult } from '../api/validate-entry';
import { useCreateEntry } from '../api/create-entry';
import { useUpdateEntry } from '../api/update-entry';
import { useEntryAction } from '../api/entry-actions';
import type { DocumentSource } from '../api/send-document';
import { documentFromForm, EDITABLE_ROWS, emptyForm, formFromDocument, localProblems, locate, mergeProblems, type EntryForm, type EstimateRow, type Problem } from '../lib/entry-form';
import { DropZone } from './drop-zone';
import { EstimatesTable, cellProblems, type RowsChange } from './estimates-table';
import { MetadataForm } from './metadata-form';
import { ProblemList } from './problem-list';
import { ScorePreview } from './score-preview';
import { formatUtcDateTime } from '@/lib/format-time';
import { SubmissionsNotice, takesDraft, takesSubmission } from './submissions-notice';

const EDITABLE_STATES = ['draft', 'returned'];
const kib = (n: number) => (n < 1024 * 1024 ? `${(n / 1024).toFixed(1)} KiB` : `${(n / 1024 / 1024).toFixed(1)} MiB`);

export function SubmitPage({ challenge, targets, teams, entry, receivedAt }: { challenge: ChallengeDetail; targets: Target[]; teams: MeTeam[]; entry: Entry | null; receivedAt: number }) {
  const navigate = useNavigate();
  const [, setSearch] = useSearchParams();
  const current = useMemo(() => ({ id: challenge.slug, version: challenge.version.version, checksum: `sha256:${challenge.version.checksum}` }), [challenge]);
  // a new entry starts in the track of its team (a hardware team's in the hardware track)
  const teamOf = (id: string) => teams.find((t) => t.id === id);
  const [form, setForm] = useState<EntryForm>(() => (entry?.document ? formFromDocument(entry.document, current)
    : emptyForm(current, teamOf(teams.length === 1 ? teams[0].id : '')?.track)));
  const [file, setFile] = useState<{ file: File; estimates: number | null; parsed: boolean } | null>(null);
  // a stored draft saved with problems shows them at once
  const [problems, setProblems] = useState<Problem[]>(() => entry?.problems ?? []);
  const [warnings, setWarnings] = useState<Problem[]>([]);
  const [result, setResult] = useState<ValidateResult | null>(null);
  const [message, setMessage] = useState<{ tone: 'danger' | 'ok' | 'info'; text: string } | null>(null);
  const [entryId, setEntryId] = useState<string | null>(entry?.id ?? null);
  const [entryState, setEntryState] = useState<string | null>(entry?.state ?? null);
  const [teamId, setTeamId] = useState<string>(entry?.team.id ?? (teams.length === 1 ? teams[0].id : ''));
  const [dirty, setDirty] = useState(false);
  const [savedWithProblems, setSavedWithProblems] = useState<number>(() => entry?.problems?.length ?? 0);
  const [submitting, setSubmitting] = useState(false);
  const resultsRef = useRef<HTMLDivElement>(null);

  const check = useValidateEntry();
  const create = useCreateEntry();
  const update = useUpdateEntry();
  const action = useEntryAction();
  const frozen = entryState !== null && !EDITABLE_STATES.includes(entryState);
  const tooLarge = form.estimates.length > EDITABLE_ROWS;
  const targetKeys = useMemo(() => targets.map((t) => t.key), [targets]);
  const cells = useMemo(() => cellProblems(problems), [problems]);

  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty]);

  const source = (): DocumentSource => (file && !dirty ? { kind: 'file', file: file.file } : file && tooLarge ? { kind: 'file', file: file.file } : { kind: 'json', document: documentFromForm(form) });

  /**
   * The server checks the targets beside the format whenever the challenge reference is
   * well-formed; when it is not, it cannot tell which version's targets apply. The page knows the
   * targets, so it adds those at once rather than one round of fixes later.
   */
  const withTargetProblems = (ps: Problem[], rows: EstimateRow[]): Problem[] => {
    if (ps.some((p) => /^\/(estimates\/\d+\/target|challenge)/.test(p.path))) return ps;
    const known = new Set(targetKeys);
    const extra = rows.flatMap((r, k) =>
      r.target && !known.has(r.target) ? [{ path: `/estimates/${k}/target`, message: `"${r.target}" is not a target of ${challenge.slug} v${challenge.version.version}: choose one from the list (GET /api/challenges/${challenge.slug}/targets)` }] : []);
    return [...ps, ...extra].sort((a, b) => a.path.localeCompare(b.path, 'en', { numeric: true }));
  };

  const showError = (e: unknown, rows: EstimateRow[] = form.estimates, f: EntryForm = form) => {
    if (e instanceof ApiError && e.problems.length) {
      const ps = mergeProblems(withTargetProblems(e.problems, rows), localProblems({ ...f, estimates: rows }));
      setProblems(ps);
      setMessage({ tone: 'danger', text: `${ps.length === 1 ? 'One problem' : `${ps.length} problems`} to fix: each is listed with the field it names and marked beside that field.` });
    } else {
      setMessage({ tone: 'danger', text: errorMessage(e) });
    }
  };

  const runCheck = async (src: DocumentSource = source(), rows: EstimateRow[] = form.estimates, f: EntryForm = form) => {
    setMessage(null);
    try {
      const r = await check.mutateAsync(src);
      const local = localProblems({ ...f, estimates: rows });
      if (local.length) throw new ApiError({ status: 400, code: 'validation_failed', message: local[0].message, problems: local });
      setProblems([]);
      setWarnings(r.warnings);
      setResult(r);
      const valid = `The entry is valid: ${r.estimates} estimate${r.estimates === 1 ? '' : 's'}, covering ${r.coverage.covered} of ${r.coverage.targets} targets.`;
      setMessage(r.acceptsDrafts && !r.acceptsSubmissions ? { tone: 'info', text: `${valid} It can be saved as a draft now but not yet submitted: see the warnings.` }
        : !r.acceptsSubmissions ? { tone: 'info', text: `${valid} The challenge does not take it now: see the warnings.` }
        : { tone: 'ok', text: valid });
    } catch (e) {
      setResult(null);
      setWarnings([]);
      showError(e, rows, f);
    }
    requestAnimationFrame(() => resultsRef.current?.scrollIntoView({ block: 'start', behavior: 'smooth' }));
  };

  const onFile = async (f: File) => {
    setMessage(null);
    let parsed = false;
    let n: number | null = null;
    let rows: EstimateRow[] = [];
    let next: EntryForm = form;
    try {
      const doc = JSON.parse(await f.text()) as { estimates?: unknown[] };
      n = Array.isArray(doc.estimates) ? doc.estimates.length : null;
      next = formFromDocument(doc, current);
      setForm(next);
      rows = next.estimates;
      parsed = true;
    } catch {
      /* not JSON: the dry run says so */
    }
    setFile({ file: f, estimates: n, parsed });
    setDirty(true);
    await runCheck({ kind: 'file', file: f }, rows, parsed ? next : { ...form, estimates: [] });
  };

  /** an edit: the form is now the source, and problems of the edited field are cleared */
  const edit = (next: EntryForm, clear: (p: Problem) => boolean) => {
    setForm(next);
    if (file && !tooLarge) setFile(null);
    setDirty(true);
    setProblems((ps) => ps.filter((p) => !clear(p)));
  };
  const set = (patch: Partial<EntryForm>, touched?: string) =>
    edit({ ...form, ...patch }, (p) => {
      const l = locate(p.path);
      return touched !== undefined && l.kind === 'field' && (l.field === touched || l.field.startsWith(`${touched}/`));
    });
  const onRows = (rows: EstimateRow[], ch: RowsChange) => {
    const prev = form.estimates;
    const changed = new Set<number>();
    rows.forEach((r, i) => { if (prev[i] && prev[i].id === r.id && prev[i] !== r) changed.add(i); });
    const fieldOf = (i: number) => {
      const a = prev[i], b = rows[i];
      return (['target', 'value', 'uncertainty', 'kind'] as const).filter((k) => a[k] !== b[k]);
    };
    setForm({ ...form, estimates: rows });
    if (file) setFile(null);
    setDirty(true);
    setProblems((ps) => {
      const kept = ps.flatMap((p) => {
        const l = locate(p.path);
        if (l.kind !== 'cell' && l.kind !== 'row') return [p];
        // a paste replaces its rows: their old problems go, the paste's own come in
        if (ch.pasted && l.row >= ch.pasted.from && l.row < ch.pasted.from + ch.pasted.count) return [];
        if (ch.removed !== undefined) {
          if (l.row === ch.removed) return [];
          if (l.row > ch.removed) return [{ ...p, path: p.path.replace(/^\/estimates\/\d+/, `/estimates/${l.row - 1}`) }];
          return [p];
        }
        if (changed.has(l.row)) {
          const fs = fieldOf(l.row);
          if (l.kind === 'row' || fs.includes(l.column as never)) return [];
        }
        return [p];
      });
      return ch.pasted?.problems.length ? mergeProblems(kept, ch.pasted.problems) : kept;
    });
    if (ch.pasted?.problems.length) setMessage({ tone: 'danger', text: `The pasted rows have ${ch.pasted.problems.length === 1 ? 'a problem' : `${ch.pasted.problems.length} problems`}: see the errors.` });
  };

  const save = async (): Promise<{ id: string; problems: number } | null> => {
    setMessage(null);
    if (!entryId && teams.length > 1 && !teamId) {
      setMessage({ tone: 'danger', text: 'Choose the team this entry is for.' });
      return null;
    }
    try {
      const src = source();
      // a draft is saved even with problems (it cannot be submitted until they are fixed); a returned entry must be valid
      const incomplete = !entryId || entryState === 'draft';
      const out = entryId ? await update.mutateAsync({ entryId, src, teamId, incomplete }) : await create.mutateAsync({ slug: challenge.slug, src, teamId: teamId || undefined, incomplete });
      setEntryId(out.id);
      setEntryState(out.state ?? 'draft');
      setWarnings(out.warnings ?? []);
      setDirty(false);
      setSearch((s) => { s.set('entry', out.id); return s; }, { replace: true });
      const local = localProblems(form);
      if (out.incomplete || local.length) {
        const ps = mergeProblems(withTargetProblems(out.problems ?? [], form.estimates), local);
        setProblems(ps);
        setSavedWithProblems(ps.length);
        return { id: out.id, problems: ps.length };
      }
      setProblems([]);
      setSavedWithProblems(0);
      return { id: out.id, problems: 0 };
    } catch (e) {
      showError(e);
      requestAnimationFrame(() => resultsRef.current?.scrollIntoView({ block: 'start', behavior: 'smooth' }));
      return null;
    }
  };

  const onSave = async () => {
    const out = await save();
    if (!out) return;
    if (out.problems) {
      setMessage({ tone: 'info', text: `Draft saved with ${out.problems === 1 ? 'one problem' : `${out.problems} problems`}: it cannot be submitted until ${out.problems === 1 ? 'it is' : 'they are'} fixed. You can come back to it from My entries.` });
      requestAnimationFrame(() => resultsRef.current?.scrollIntoView({ block: 'start', behavior: 'smooth' }));
    } else setMessage({ tone: 'ok', text: 'Draft saved. You can come back to it from My entries.' });
  };

  const onSubmit = async () => {
    setSubmitting(true);
    try {
      const saved = dirty || !entryId ? await save() : { id: entryId, problems: savedWithProblems };
      if (!saved) return;
      if (saved.problems) {
        setMessage({ tone: 'danger', text: `The draft is saved, but it has ${saved.problems === 1 ? 'one problem' : `${saved.problems} problems`} and cannot be submitted until ${saved.problems === 1 ? 'it is' : 'they are'} fixed.` });
        requestAnimationFrame(() => resultsRef.current?.scrollIntoView({ block: 'start', behavior: 'smooth' }));
        return;
      }
      const id = saved.id;
      await action.mutateAsync({ action: 'submit', entryId: id, teamId });
      setDirty(false);
      navigate(`/my-entries?submitted=${id}`);
    } catch (e) {
      showError(e);
    } finally {
      setSubmitting(false);
    }
  };

  const errorFor = (field: string) => problems.find((p) => { const l = locate(p.path); return l.kind === 'field' && l.field === field; })?.message;
  const challengeError = errorFor('challenge');
  const estimatesError = errorFor('estimates');
  const busy = check.isPending || create.isPending || update.isPending || submitting;
  const noTeam = teams.length === 0;
  // what the challenge settings allow now (the server refuses the rest with a 409 all the same):
  // a new entry is stored only while its track takes drafts (also before the window opens); a
  // draft is submitted only while its track takes submissions; a returned entry goes back to
  // review whatever they say
  const cannotSave = !takesDraft(challenge, form.track) && !entryId;
  const cannotSubmit = !takesSubmission(challenge, form.track) && entryState !== 'returned';
  const opensAt = challenge.submissions.window.opensAt;
  const draftsOnly = cannotSubmit && takesDraft(challenge, form.track) && opensAt !== null;
  const notNow = 'The challenge takes no new entries in this track now (see the note at the top)';
  const notYet = draftsOnly ? `Submissions open ${formatUtcDateTime(opensAt)}: save the draft now and submit it from then on` : notNow;

  return (
    <div>
      <PageHeader
        kicker={<Link to={`/challenges/${challenge.slug}`}>{challenge.title}</Link>}
        title={entryId ? `Entry${form.label ? `: ${form.label}` : ''}` : 'Submit an entry'}
        actions={entryState && <Badge tone={entryState === 'returned' ? 'danger' : 'neutral'}>{entryState}</Badge>}
      >
        <p className="text-sm">
          Version {challenge.version.version}, checksum <code className="break-all text-xs">{challenge.version.checksum.slice(0, 12)}…</code> · {targets.length} targets.
          Uncertainties are standard uncertainties (1σ).
        </p>
      </PageHeader>

      <SubmissionsNotice challenge={challenge} track={form.track} entryState={entryState} receivedAt={receivedAt} />
      {noTeam && <FormMessage tone="info">Entries belong to teams and you are in none. <Link to="/teams">Create a team or accept an invitation</Link> first.</FormMessage>}
      {frozen && <FormMessage tone="info">This entry is {entryState} and can no longer be edited. <Link to="/my-entries">Back to My entries</Link></FormMessage>}
      {entry?.state === 'returned' && <ReturnedNote entry={entry} />}

      <div className="space-y-6">
        <Panel title="Start from a file" description="An entry document (schemas/entry.schema.json). It is checked as it is; small entries can then be edited below.">
          <DropZone onFile={onFile} disabled={busy || frozen}>Up to {EDITABLE_ROWS.toLocaleString('en')} estimates can be edited here; larger files are checked and stored as they are.</DropZone>
          <p className="mt-2 text-sm">
            <a href={`/api/challenges/${encodeURIComponent(challenge.slug)}/sample-entry.json?version=${challenge.version.version}&track=${form.track === 'hardware' ? 'hardware' : 'classical'}`} download data-testid="sample-entry">Download a sample file</a>{' '}
            with every target of version {challenge.version.version} and its checksum, to fill in by script (see the <Link to="/api-reference">API reference</Link>).
          </p>
          {file && (
            <p className="mt-2 text-sm text-ink-soft" data-testid="file-info">
              {file.file.name} · {kib(file.file.size)}{file.estimates !== null && ` · ${file.estimates} estimates`}
              {!file.parsed && ' · not readable as JSON'}
            </p>
          )}
        </Panel>

        <div ref={resultsRef} className="scroll-mt-4 space-y-3" data-testid="check-results" aria-live="polite">
          {message && <FormMessage tone={message.tone}>{message.text}</FormMessage>}
          {problems.length > 0 && (
            <section aria-label="Errors" className="space-y-1">
              <h2 className="text-base font-semibold">Errors</h2>
              <ProblemList problems={problems} tone="danger" testId="error-list" />
            </section>
          )}
          {warnings.length > 0 && (
            <section aria-label="Warnings" className="space-y-1">
              <h2 className="text-base font-semibold">Warnings <span className="text-sm font-normal text-ink-soft">accepted, but worth a look</span></h2>
              <ProblemList problems={warnings} tone="warning" testId="warning-list" />
            </section>
          )}
          {result && (
            <Panel title="Score preview" description="What the scores would be now. Nothing is stored by a check.">
              <ScorePreview result={result} />
            </Panel>
          )}
        </div>

        {challengeError && (
          <div id="f-challenge" className="rounded border border-danger/40 bg-danger-soft px-3 py-2 text-sm text-danger-ink">
            <p><strong>Challenge version:</strong> {challengeError}</p>
            <p className="mt-1">This entry names {form.challenge.id} v{form.challenge.version}.{' '}
              <button type="button" className="underline" onClick={() => set({ challenge: current }, 'challenge')}>Answer the current version {current.version} instead</button>
            </p>
          </div>
        )}

        <Panel title="Estimates" description={`${form.estimates.length} row${form.estimates.length === 1 ? '' : 's'} · one estimate per target`} id="f-estimates">
          {estimatesError && <p className="mb-2 text-sm text-danger">{estimatesError}</p>}
          {tooLarge ? (
            <p className="text-sm text-ink-soft">This file has {form.estimates.length.toLocaleString('en')} estimates: too many to edit in the browser. Fix the file and drop it again; it is stored as it is.</p>
          ) : (
            <EstimatesTable rows={form.estimates} onRowsChange={onRows} targets={targetKeys} problems={cells} />
          )}
        </Panel>

        <Panel title="About the method">
          <MetadataForm form={form} set={set} errorFor={errorFor} />
        </Panel>

        {teams.length > 1 && !entryId && (
          <Panel title="Team">
            <SelectField label="This entry is for" value={teamId} onChange={(e) => setTeamId(e.target.value)} wrapperClassName="max-w-sm">
              <option value="">choose a team…</option>
              {teams.map((t) => <option key={t.id} value={t.id}>{t.name}</option>)}
            </SelectField>
          </Panel>
        )}
      </div>

      <div className="sticky bottom-0 z-10 -mx-4 mt-6 border-t border-rule bg-paper/95 backdrop-blur sm:mx-0">
        <div className="flex flex-wrap items-center gap-2 px-4 py-3 sm:px-0">
          <Button variant="secondary" onClick={() => runCheck()} busy={check.isPending} disabled={busy || frozen}>Check</Button>
          <Button variant="secondary" onClick={onSave} busy={create.isPending || update.isPending} disabled={busy || frozen || noTeam || cannotSave} title={cannotSave ? notNow : undefined}>Save draft</Button>
          <Button onClick={onSubmit} busy={submitting} disabled={busy || frozen || noTeam || cannotSubmit} title={cannotSubmit ? notYet : undefined} aria-describedby={cannotSubmit && !frozen ? 'submit-not-now' : undefined}>Submit for review</Button>
          {cannotSubmit && !frozen && <span id="submit-not-now" className="text-xs text-ink-soft" data-testid="submit-not-now">{draftsOnly ? `Submissions open ${formatUtcDateTime(opensAt)}` : 'Not taking submissions now'}</span>}
          <span className={cx('ml-auto hidden text-sm sm:inline', dirty ? 'text-ink-soft' : 'text-ink-faint')}>
            {dirty ? 'Unsaved changes' : entryId ? 'Saved' : ''}
          </span>
        </div>
      </div>
    </div>
  );
}

function ReturnedNote({ entry }: { entry: Entry }) {
  const last = [...(entry.history ?? [])].reverse().find((h) => h.reason && h.action === 'entry.review');
  return (
    <div className="mb-4">
      <FormMessage tone="danger">
        <strong>Returned by a moderator.</strong> {last?.reason ? <>“{last.reason}”</> : 'No reason was recorded.'} Edit the entry, check it and submit it again.
      </FormMessage>
    </div>
  );
}
