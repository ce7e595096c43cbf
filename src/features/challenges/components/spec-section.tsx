import { useMemo, useState } from 'react';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useLightCone } from '@/features/challenges/api/get-light-cone';
import { ApiError } from '@/lib/api-client';
import { formatAngle, formatDate, formatDateTime } from '@/lib/format';
import { Badge, CopyButton, Panel, Progress, Table, Td, Th, buttonClass, inputClass } from '@/components/ui';
import { LatticeDrawing, graphLightCone, observableSupport } from './lattice-drawing';

const api = (slug: string, rest: string) => `/api/challenges/${encodeURIComponent(slug)}${rest}`;

export function observableLabel(o: ChallengeDetail['observables'][number]): string {
  const t = o.spec.terms;
  if (t && t.length === 1) return `${o.key} = ${t[0].pauli}`;
  if (t && t.length > 1) return `${o.key} (${t.length} terms)`;
  return o.key;
}

export function SpecSection({ c }: { c: ChallengeDetail }) {
  return (
    <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <div className="space-y-6">
        <Panel title="Description" id="spec-description">
          <p className="max-w-prose whitespace-pre-line">{c.description}</p>
          <dl className="mt-4 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-ink-soft">Version</dt>
            <dd className="num">v{c.version.version} · published {formatDate(c.version.publishedAt)}</dd>
            <dt className="text-ink-soft">Checksum</dt>
            <dd className="flex min-w-0 flex-wrap items-center gap-2">
              <code className="min-w-0 text-xs break-all" data-testid="checksum">sha256:{c.version.checksum}</code>
              <CopyButton text={`sha256:${c.version.checksum}`} label="Copy checksum" />
            </dd>
            <dt className="text-ink-soft">Lattice</dt>
            <dd>{c.lattice.kind}, <span className="num">{c.lattice.qubits}</span> qubits, <span className="num">{c.lattice.edges.length}</span> couplings</dd>
            <dt className="text-ink-soft">Observables</dt>
            <dd>{c.observables.map((o) => <span key={o.key} className="mr-2 inline-block"><code>{observableLabel(o)}</code></span>)}</dd>
            <dt className="text-ink-soft">Licence</dt>
            <dd>{c.settings.license ?? 'not stated'}</dd>
          </dl>
          <div className="mt-4 flex flex-wrap gap-2">
            <a className={buttonClass('secondary', 'sm')} href={api(c.slug, `/spec.json?version=${c.version.version}`)} download>Download the JSON spec</a>
          </div>
        </Panel>
        <InstancesPanel c={c} />
      </div>
      <div className="space-y-6">
        <LatticePanel c={c} />
        <VersionsPanel c={c} />
        <JobsPanel c={c} />
      </div>
    </div>
  );
}

function LatticePanel({ c }: { c: ChallengeDetail }) {
  const steps = useMemo(() => [...new Set(c.instances.map((i) => i.params.steps ?? 0))].sort((a, b) => a - b), [c.instances]);
  const thetas = useMemo(() => [...new Set(c.instances.map((i) => i.params.thetaH ?? 0))].sort((a, b) => a - b), [c.instances]);
  // start from a one-site observable near the middle of the lattice: its cone is the clearest
  const central = useMemo(() => {
    const mid = c.lattice.qubits / 2;
    const single = c.observables.map((o) => ({ o, s: [...observableSupport(o.spec)] })).filter((x) => x.s.length === 1);
    single.sort((a, b) => Math.abs(a.s[0] - mid) - Math.abs(b.s[0] - mid));
    return single[0]?.o.key ?? c.observables[0]?.key ?? '';
  }, [c]);
  const [obs, setObs] = useState(central);
  const [step, setStep] = useState(steps[Math.min(2, steps.length - 1)] ?? 1);
  const [theta, setTheta] = useState(thetas[Math.min(1, thetas.length - 1)] ?? 0);
  const inst = c.instances.find((i) => i.params.steps === step && i.params.thetaH === theta) ?? c.instances[0];
  const target = inst && obs ? `${inst.key}:${obs}` : '';
  const lc = useLightCone(c.slug, target);
  const o = c.observables.find((x) => x.key === obs);
  const support = useMemo(() => observableSupport(o?.spec), [o]);
  const fallback = lc.isError && lc.error instanceof ApiError && lc.error.status === 404;
  const cone = useMemo(() => {
    if (lc.data) return new Set(lc.data.qubits);
    if (fallback) return graphLightCone(c.lattice.qubits, c.lattice.edges, support, step);
    return null;
  }, [lc.data, fallback, c.lattice, support, step]);
  return (
    <Panel title="Lattice and light cone" id="spec-lattice" description="The qubits that can influence the selected target.">
      <div className="mb-3 grid grid-cols-3 gap-2 text-sm">
        <label>
          <span className="block text-xs text-ink-soft">Observable</span>
          <select value={obs} onChange={(e) => setObs(e.target.value)} className={inputClass(false, 'w-full', true)}>
            {c.observables.map((x) => <option key={x.key} value={x.key}>{x.key}</option>)}
          </select>
        </label>
        <label>
          <span className="block text-xs text-ink-soft">Steps</span>
          <select value={step} onChange={(e) => setStep(Number(e.target.value))} className={inputClass(false, 'w-full', true)}>
            {steps.map((s) => <option key={s} value={s}>{s}</option>)}
          </select>
        </label>
        <label>
          <span className="block text-xs text-ink-soft">θ<sub>h</sub></span>
          <select value={theta} onChange={(e) => setTheta(Number(e.target.value))} className={inputClass(false, 'w-full', true)}>
            {thetas.map((t) => <option key={t} value={t}>{formatAngle(t)}</option>)}
          </select>
        </label>
      </div>
      <LatticeDrawing lattice={c.lattice} cone={cone} support={support} title={`Lattice of ${c.title}`} />
      <p className="mt-2 text-xs text-ink-soft" aria-live="polite">
        Target <code>{target}</code>
        {lc.isPending && ' · loading the light cone…'}
        {fallback && ' · light cone estimated in the browser (graph distance ≤ steps); the server gave none.'}
        {lc.isError && !fallback && ' · the light cone could not be loaded.'}
      </p>
    </Panel>
  );
}

function InstancesPanel({ c }: { c: ChallengeDetail }) {
  const [all, setAll] = useState(false);
  const sorted = useMemo(() => [...c.instances].sort((a, b) => (a.params.steps ?? 0) - (b.params.steps ?? 0) || (a.params.thetaH ?? 0) - (b.params.thetaH ?? 0)), [c.instances]);
  const rows = all ? sorted : sorted.slice(0, 12);
  return (
    <Panel title="Instances" id="spec-instances" description={<span className="num">{c.instances.length} circuits, each with {c.observables.length} observables</span>}>
      <Table aria-label="Instances" data-testid="instances">
        <thead>
          <tr><Th>Instance</Th><Th num>Steps</Th><Th num className="normal-case">θ<sub>h</sub></Th><Th num>Gates</Th><Th num>Depth</Th><Th className="text-right"><abbr title="OpenQASM 3" className="no-underline">QASM</abbr></Th></tr>
        </thead>
        <tbody>
          {rows.map((i) => (
            <tr key={i.key}>
              <Td><code className="text-xs whitespace-nowrap">{i.key}</code></Td>
              <Td num>{i.params.steps ?? '—'}</Td>
              <Td num title={String(i.params.thetaH)}>{i.params.thetaH !== undefined ? formatAngle(i.params.thetaH) : '—'}</Td>
              <Td num>{i.gateCount.toLocaleString('en-GB')}</Td>
              <Td num>{i.depth}</Td>
              <Td className="text-right"><a href={api(c.slug, `/instances/${encodeURIComponent(i.key)}/qasm?version=${c.version.version}`)} download aria-label={`OpenQASM 3 of ${i.key}`}>.qasm</a></Td>
            </tr>
          ))}
        </tbody>
      </Table>
      {c.instances.length > 12 && (
        <button type="button" className={buttonClass('ghost', 'sm', 'mt-2')} onClick={() => setAll(!all)} aria-expanded={all}>
          {all ? 'Show fewer' : `Show all ${c.instances.length} instances`}
        </button>
      )}
    </Panel>
  );
}

function VersionsPanel({ c }: { c: ChallengeDetail }) {
  return (
    <Panel title="Versions" id="spec-versions">
      <ol className="space-y-3 text-sm">
        {c.versions.map((v) => (
          <li key={v.version} className="border-l-2 border-rule pl-3">
            <div className="flex flex-wrap items-center gap-2">
              <span className="num font-medium">v{v.version}</span>
              <Badge tone={v.state === 'published' ? 'ok' : v.state === 'superseded' ? 'neutral' : 'disputed'}>{v.state}</Badge>
              {v.version === c.version.version && <Badge>shown</Badge>}
              <span className="num text-ink-soft">{formatDate(v.publishedAt)}</span>
            </div>
            <code className="block text-xs break-all text-ink-faint">sha256:{v.checksum}</code>
            {v.supersededReason && <p className="mt-1 text-ink-soft">Superseded: {v.supersededReason}</p>}
          </li>
        ))}
      </ol>
    </Panel>
  );
}

const JOB_LABEL: Record<string, string> = { references: 'Exact references', 'demo-entries': 'Demo entries', standings: 'Standings', baseline: 'House baseline' };

function JobsPanel({ c }: { c: ChallengeDetail }) {
  if (!c.jobs.length) return null;
  const active = c.jobs.filter((j) => j.state === 'queued' || j.state === 'running');
  // the newest finished job of each kind (the list is newest first)
  const recent = c.jobs.filter((j) => !(j.state === 'queued' || j.state === 'running')).filter((j, i, a) => a.findIndex((x) => x.kind === j.kind) === i);
  return (
    <Panel title="Reference computations" id="spec-jobs" description={active.length ? 'Running now; this updates by itself.' : 'All finished.'}>
      <div className="space-y-3" data-testid="jobs">
        {active.map((j) => (
          <div key={j.id}>
            <Progress value={j.state === 'queued' ? undefined : j.progress ?? undefined} label={`${JOB_LABEL[j.kind] ?? j.kind} — ${j.state === 'queued' ? 'waiting' : j.note ?? 'running'}`} />
          </div>
        ))}
        {recent.map((j) => (
          <div key={j.id} className="flex flex-wrap items-baseline justify-between gap-2 text-sm">
            <span>{JOB_LABEL[j.kind] ?? j.kind}{j.note ? <span className="text-ink-soft"> — {j.note}</span> : null}</span>
            <span className="num text-xs text-ink-soft">
              {j.state === 'failed' ? <Badge tone="danger">failed</Badge> : <Badge tone="ok">{j.state}</Badge>} {formatDateTime(j.finishedAt)}
            </span>
            {j.error && <p className="w-full text-xs text-danger">{j.error}</p>}
          </div>
        ))}
      </div>
    </Panel>
  );
}
