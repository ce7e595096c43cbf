/**
 * Challenge authoring in four steps: upload a spec → preview (validation errors, or the lattice,
 * the instance grid, the targets and the planner's report) → store the draft → publish (a
 * correction of a published challenge needs a reason) → follow the reference job's progress.
 */
import { Fragment, useMemo, useState } from 'react';
import { Link } from 'react-router';
import { ApiError, errorMessage } from '@/lib/api-client';
import { formatHours, formatSig } from '@/lib/format';
import { useChallenge } from '@/features/challenges/api/get-challenge';
import { Badge, Button, Field, FormMessage, Panel, Progress, Spinner, Table, Td, Th } from '@/components/ui';
import { DropZone } from '@/features/submit/components/drop-zone';
import { ProblemList } from '@/features/submit/components/problem-list';
import { usePreviewSpec, usePublishChallenge, useJob, useStoreDraft, type PlanRow, type SpecPreview, type StoredDraft } from '../api/author-challenge';
import { LatticeDrawing } from '@/features/challenges/components/lattice-drawing';

interface SpecShape { title?: string; circuit?: { family?: string; steps?: number[]; thetaH?: number[] }; observables?: { id: string }[] }

const instanceOf = (target: string) => target.slice(0, target.lastIndexOf(':'));
const seconds = (s: number | null) => (s === null ? '—' : s < 1 ? '< 1 s' : s < 120 ? `${formatSig(s, 2)} s` : s < 7200 ? `${formatSig(s / 60, 2)} min` : formatHours(s / 3600));

export function AuthorChallenge({ published }: { published: Set<string> }) {
  const [file, setFile] = useState<File | null>(null);
  const [spec, setSpec] = useState<SpecShape | null>(null);
  const [draft, setDraft] = useState<StoredDraft | null>(null);
  const [jobId, setJobId] = useState<string | null>(null);
  const [reason, setReason] = useState('');
  const preview = usePreviewSpec();
  const store = useStoreDraft();
  const publish = usePublishChallenge();

  const onFile = async (f: File) => {
    setFile(f); setDraft(null); setJobId(null); store.reset(); publish.reset();
    try { setSpec(JSON.parse(await f.text()) as SpecShape); } catch { setSpec(null); }
    preview.mutate(f);
  };
  const p = preview.data;
  const correction = p ? published.has(p.id) : false;
  const problems = preview.error instanceof ApiError ? preview.error.problems : [];

  return (
    <Panel title="New challenge or correction" description="Upload a challenge spec (schemas/challenge.schema.json). Nothing is stored until you store the draft." id="author">
      <div className="space-y-5">
        <DropZone onFile={onFile} disabled={preview.isPending || store.isPending || publish.isPending}>Step 1 of 4: the spec is validated and planned, not stored.</DropZone>
        {file && <p className="text-sm text-ink-soft">{file.name}</p>}
        {preview.isPending && <Spinner label="Validating and planning…" />}
        {preview.isError && (
          <div className="space-y-2">
            <FormMessage>{errorMessage(preview.error)}</FormMessage>
            <ProblemList problems={problems} tone="danger" testId="spec-errors" />
          </div>
        )}
        {p && <PreviewView p={p} spec={spec} />}

        {p && !draft && (
          <div className="flex flex-wrap items-center gap-3 border-t border-rule pt-4">
            <Button onClick={() => file && store.mutate(file, { onSuccess: setDraft })} busy={store.isPending}>Store the draft</Button>
            <span className="text-sm text-ink-soft">Step 2 of 4: stored as a draft version; only moderators see it.</span>
            {store.isError && <div className="w-full"><FormMessage>{errorMessage(store.error)}</FormMessage>{store.error instanceof ApiError && <ProblemList problems={store.error.problems} tone="danger" />}</div>}
          </div>
        )}

        {draft && (
          <div className="space-y-3 border-t border-rule pt-4" data-testid="draft-stored">
            <FormMessage tone="ok">Stored <strong>{draft.slug}</strong> version {draft.version} as a draft: {draft.instances} instances, {draft.targets} targets.</FormMessage>
            <DraftInstances slug={draft.slug} />
            {!jobId && (
              <form className="space-y-3" onSubmit={(e) => { e.preventDefault(); publish.mutate({ slug: draft.slug, reason: reason.trim() || undefined }, { onSuccess: (r) => setJobId(r.jobId) }); }}>
                {correction && (
                  <Field label="Reason for the correction" required value={reason} onChange={(e) => setReason(e.target.value)} maxLength={2000}
                    hint={`${draft.slug} is published already: this version supersedes it, and the reason is shown in its history.`}
                    error={publish.error instanceof ApiError ? publish.error.problemFor('/reason') : undefined} />
                )}
                <div className="flex flex-wrap items-center gap-3">
                  <Button type="submit" busy={publish.isPending}>Publish</Button>
                  <span className="text-sm text-ink-soft">Step 3 of 4: public at once; the exact references are computed in the background.</span>
                </div>
                {publish.isError && !(publish.error instanceof ApiError && publish.error.problemFor('/reason')) && <FormMessage>{errorMessage(publish.error)}</FormMessage>}
              </form>
            )}
            {jobId && <JobProgress jobId={jobId} slug={draft.slug} />}
          </div>
        )}
      </div>
    </Panel>
  );
}

function PreviewView({ p, spec }: { p: SpecPreview; spec: SpecShape | null }) {
  const byMethod = useMemo(() => {
    const m = new Map<string, { n: number; seconds: number }>();
    for (const x of p.plans) {
      const k = x.method ?? 'none';
      const cur = m.get(k) ?? { n: 0, seconds: 0 };
      m.set(k, { n: cur.n + 1, seconds: cur.seconds + (x.estimatedSeconds ?? 0) });
    }
    return [...m.entries()].sort((a, b) => (a[0] === 'none' ? 1 : b[0] === 'none' ? -1 : b[1].n - a[1].n));
  }, [p.plans]);
  const none = p.plans.filter((x) => !x.method);
  const reasons = useMemo(() => {
    const m = new Map<string, number>();
    for (const x of none) m.set(x.reason ?? 'no reason given', (m.get(x.reason ?? 'no reason given') ?? 0) + 1);
    return [...m.entries()];
  }, [none]);

  return (
    <div className="space-y-5" data-testid="spec-preview">
      <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-4">
        {[['Challenge', `${p.id} v${p.version}`], ['Qubits', String(p.qubits)], ['Instances', String(p.instances)], ['Targets', String(p.targets)]].map(([k, v]) => (
          <div key={k} className="rounded border border-rule px-3 py-2"><dt className="text-xs text-ink-soft">{k}</dt><dd className="num font-medium break-all">{v}</dd></div>
        ))}
      </dl>
      <p className="text-xs text-ink-soft break-all">Checksum sha256:{p.checksum}</p>
      <div>
        <h3 className="text-sm font-semibold">Lattice <span className="font-normal text-ink-soft">({p.lattice.kind}, {p.lattice.qubits} qubits, {p.lattice.edges.length} couplings)</span></h3>
        <div className="mt-2 overflow-x-auto rounded border border-rule bg-paper p-2 text-ink">
          <LatticeDrawing lattice={p.lattice} title={`Lattice of ${p.id}`} className="mx-auto w-full max-w-3xl" />
        </div>
      </div>
      <InstanceGrid plans={p.plans} spec={spec} />
      <div>
        <h3 className="text-sm font-semibold">The planner&rsquo;s report</h3>
        <p className="text-sm text-ink-soft">Which targets get an exact reference, by which method and at what estimated cost; which get none, and why.</p>
        <div className="mt-2 max-w-lg"><Table data-testid="plan-summary">
          <thead><tr><Th>Method</Th><Th num>Targets</Th><Th num>Estimated time</Th></tr></thead>
          <tbody>
            {byMethod.map(([m, s]) => (
              <tr key={m}><Td>{m === 'none' ? <Badge tone="disputed">no exact reference</Badge> : <Badge tone="exact">{m}</Badge>}</Td><Td num>{s.n}</Td><Td num>{m === 'none' ? '—' : seconds(s.seconds)}</Td></tr>
            ))}
          </tbody>
        </Table></div>
        {reasons.length > 0 && (
          <ul className="mt-2 list-disc pl-5 text-sm">{reasons.map(([r, n]) => <li key={r}><span className="num">{n}</span> without: {r}</li>)}</ul>
        )}
        <details className="mt-3">
          <summary className="cursor-pointer text-sm">Every target ({p.plans.length})</summary>
          <PlanTable plans={p.plans} />
        </details>
      </div>
    </div>
  );
}

function PlanTable({ plans }: { plans: PlanRow[] }) {
  return (
    <Table className="mt-2">
      <thead><tr><Th>Target</Th><Th>Method</Th><Th>Size</Th><Th num>Est. time</Th><Th>Reason</Th></tr></thead>
      <tbody>
        {plans.map((x) => (
          <tr key={x.target}>
            <Td className="font-mono text-xs">{x.target}</Td>
            <Td>{x.method ?? <span className="text-ink-soft">none</span>}</Td>
            <Td className="num text-xs">{x.size !== null ? `${x.size} ${x.unit ?? ''}` : '—'}</Td>
            <Td num>{seconds(x.estimatedSeconds)}</Td>
            <Td className="text-xs text-ink-soft">{x.reason}</Td>
          </tr>
        ))}
      </tbody>
    </Table>
  );
}

/** steps × field angle (kicked Ising), each cell: exact references planned of the targets */
function InstanceGrid({ plans, spec }: { plans: PlanRow[]; spec: SpecShape | null }) {
  const per = new Map<string, { n: number; exact: number }>();
  for (const x of plans) {
    const k = instanceOf(x.target);
    const c = per.get(k) ?? { n: 0, exact: 0 };
    per.set(k, { n: c.n + 1, exact: c.exact + (x.method ? 1 : 0) });
  }
  const steps = spec?.circuit?.steps, hs = spec?.circuit?.thetaH;
  const keys = [...per.keys()];
  const find = (s: number, h: number) => keys.find((k) => k.startsWith(`t${s}-`) && Math.abs(Number(k.split('-h')[1]) - h) < 5e-7);
  const grid = steps && hs && steps.every((s) => hs.every((h) => find(s, h)));
  const cell = (k: string | undefined) => {
    const c = k ? per.get(k) : undefined;
    if (!c) return <Td>—</Td>;
    return <Td num className={c.exact === c.n ? '' : c.exact === 0 ? 'text-disputed-ink' : 'text-ink-soft'} title={k}>{c.exact}/{c.n}</Td>;
  };
  return (
    <div>
      <h3 className="text-sm font-semibold">Instances <span className="font-normal text-ink-soft">({per.size}; each cell: targets with a planned exact reference / targets)</span></h3>
      {grid ? (
        <div className="mt-2 max-w-lg"><Table data-testid="instance-grid">
          <thead><tr><Th>Steps \ θ<sub>h</sub></Th>{hs!.map((h) => <Th key={h} num>{String(Number(h.toFixed(4)))}</Th>)}</tr></thead>
          <tbody>{steps!.map((s) => <tr key={s}><Td className="num font-medium">{s}</Td>{hs!.map((h) => <Fragment key={h}>{cell(find(s, h))}</Fragment>)}</tr>)}</tbody>
        </Table></div>
      ) : (
        <p className="mt-1 flex flex-wrap gap-1 text-xs">{keys.map((k) => <Badge key={k}>{k}: {per.get(k)!.exact}/{per.get(k)!.n}</Badge>)}</p>
      )}
    </div>
  );
}

/** gate counts and depth per instance, from the stored draft (the preview does not compile) */
function DraftInstances({ slug }: { slug: string }) {
  const c = useChallenge(slug);
  if (c.isPending) return <Spinner label="Compiling the instances…" />;
  if (c.isError) return null;
  const inst = c.data.instances;
  return (
    <details>
      <summary className="cursor-pointer text-sm">Gate counts of the {inst.length} instances (total {inst.reduce((a, i) => a + i.gateCount, 0).toLocaleString('en')} gates)</summary>
      <Table className="mt-2">
        <thead><tr><Th>Instance</Th><Th num>Qubits</Th><Th num>Gates</Th><Th num>Depth</Th></tr></thead>
        <tbody>{inst.map((i) => <tr key={i.key}><Td className="font-mono text-xs">{i.key}</Td><Td num>{i.qubits}</Td><Td num>{i.gateCount.toLocaleString('en')}</Td><Td num>{i.depth}</Td></tr>)}</tbody>
      </Table>
    </details>
  );
}

function JobProgress({ jobId, slug }: { jobId: string; slug: string }) {
  const j = useJob(jobId);
  const job = j.data;
  const state = job?.state ?? 'queued';
  return (
    <div className="space-y-2" data-testid="reference-job">
      <Progress value={state === 'queued' ? undefined : job?.progress ?? 0} label={state === 'done' ? 'References computed' : state === 'failed' ? 'The reference job failed' : state === 'queued' ? 'Reference job queued…' : `Computing exact references${job?.note ? `: ${job.note}` : ''}`} />
      <p className="text-sm text-ink-soft" data-testid="job-state">Step 4 of 4 · job {state}{job?.finishedAt && ` · finished`}</p>
      {job?.error && <FormMessage>{job.error}</FormMessage>}
      {state === 'done' && <FormMessage tone="ok">Published. <Link to={`/challenges/${slug}`}>Open the challenge page</Link> or <Link to={`/moderation/challenges/${slug}`}>its moderation tools</Link>.</FormMessage>}
      {j.isError && <FormMessage>{errorMessage(j.error)}</FormMessage>}
    </div>
  );
}
