import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import type { ChallengeSpec } from '@shared/physics/challenge';
import { DEFAULT_THETA_J } from '@shared/physics/kicked-ising';
import { latticeNumbering, edgeColouring, type LatticeSpec } from '@shared/physics/lattices';
import { RZZ_DEFINITION } from '@shared/physics/qasm';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useLightCone } from '@/features/challenges/api/get-light-cone';
import { formatAngle, formatDate, formatDateTime, formatSig } from '@/lib/format';
import { Badge, CopyButton, Panel, Progress, Table, Td, Th, buttonClass, inputClass } from '@/components/ui';
import { LatticeDrawing } from './lattice-drawing';
import { ObservableFormula, observableText } from './observable-formula';
import { BROWSER_CONE_GATE_LIMIT, parseObservables, supportOf, targetLightCone } from '../lib/spec-physics';

const api = (slug: string, rest: string) => `/api/challenges/${encodeURIComponent(slug)}${rest}`;

/** "w3 = X3 Y4 Z9" for option labels and headings (the one Pauli grammar: shared/physics/observable.ts) */
export function observableLabel(o: ChallengeDetail['observables'][number]): string {
  const [p] = parseObservables({ observables: [o], lattice: { qubits: Number.POSITIVE_INFINITY } }).values();
  const text = observableText(p);
  return text ? `${o.key} = ${text}` : o.key;
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
            <dd><span className="num">{c.observables.length}</span>, written out below</dd>
            <dt className="text-ink-soft">Licence</dt>
            <dd>{c.settings.license ?? 'not stated'}</dd>
          </dl>
          <div className="mt-4 flex flex-wrap gap-2">
            <a className={buttonClass('secondary', 'sm')} href={api(c.slug, `/spec.json?version=${c.version.version}`)} download>Download the JSON spec</a>
            <Link className={buttonClass('ghost', 'sm')} to={`/challenges/${encodeURIComponent(c.slug)}/specification`}>Printable specification</Link>
          </div>
        </Panel>
        <CircuitPanel c={c} />
        <ObservablesPanel c={c} />
        <InstancesPanel c={c} />
      </div>
      <div className="space-y-6">
        <LatticePanel c={c} />
        <NumberingPanel c={c} />
        <VersionsPanel c={c} />
        <JobsPanel c={c} />
      </div>
    </div>
  );
}

function LatticePanel({ c }: { c: ChallengeDetail }) {
  const steps = useMemo(() => [...new Set(c.instances.map((i) => i.params.steps ?? 0))].sort((a, b) => a - b), [c.instances]);
  const thetas = useMemo(() => [...new Set(c.instances.map((i) => i.params.thetaH ?? 0))].sort((a, b) => a - b), [c.instances]);
  const parsed = useMemo(() => parseObservables(c), [c]);
  // start from a one-site observable near the middle of the lattice: its cone is the clearest
  const central = useMemo(() => {
    const mid = c.lattice.qubits / 2;
    const single = c.observables.map((o) => ({ o, s: [...supportOf(parsed.get(o.key))] })).filter((x) => x.s.length === 1);
    single.sort((a, b) => Math.abs(a.s[0] - mid) - Math.abs(b.s[0] - mid));
    return single[0]?.o.key ?? c.observables[0]?.key ?? '';
  }, [c, parsed]);
  const [obs, setObs] = useState(central);
  const [step, setStep] = useState(steps[Math.min(2, steps.length - 1)] ?? 1);
  const [theta, setTheta] = useState(thetas[Math.min(1, thetas.length - 1)] ?? 0);
  const inst = c.instances.find((i) => i.params.steps === step && i.params.thetaH === theta) ?? c.instances[0];
  const target = inst && obs ? `${inst.key}:${obs}` : '';
  const o = parsed.get(obs) ?? null;
  const support = useMemo(() => supportOf(o), [o]);
  // the light cone by the shared rule (shared/physics/light-cone.ts), in the browser for ordinary
  // sizes; the server computes the same for the largest instances
  const local = Boolean(inst && o && inst.gateCount <= BROWSER_CONE_GATE_LIMIT);
  const localCone = useMemo(() => (local && inst && o ? targetLightCone(c.spec as unknown as ChallengeSpec, inst.key, o) : null), [local, inst, o, c.spec]);
  const lc = useLightCone(c.slug, local ? '' : target);
  const cone = localCone ?? (lc.data ? new Set(lc.data.qubits) : null);
  return (
    <Panel title="Lattice and light cone" id="spec-lattice" description="The qubits that can influence the selected target (its backward light cone).">
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
            {steps.map((x) => <option key={x} value={x}>{x}</option>)}
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
        Target <Link to={`/challenges/${encodeURIComponent(c.slug)}/targets/${encodeURIComponent(target)}`}><code>{target}</code></Link>
        {o && <> · <ObservableFormula o={o} max={3} /></>}
        {!local && lc.isPending && ' · loading the light cone…'}
        {!local && lc.isError && ' · the light cone could not be loaded.'}
      </p>
      <p className="mt-1 text-xs text-ink-soft">
        A Z site&rsquo;s cone has graph radius t&nbsp;−&nbsp;1 (the last RZZ layer commutes with Z), an X or Y site&rsquo;s radius t: an upper bound on the qubits that can change the value.
      </p>
    </Panel>
  );
}

/** the circuit as a formula, the gate conventions and the grid */
export function CircuitPanel({ c }: { c: ChallengeDetail }) {
  const spec = c.spec as unknown as ChallengeSpec;
  const colours = useMemo(() => edgeColouring(c.lattice.qubits, c.lattice.edges).length, [c.lattice]);
  if (spec.circuit.family === 'gates') {
    return (
      <Panel title="Circuit" id="spec-circuit">
        <p className="text-sm">An explicit list of <span className="num">{spec.circuit.gates.length.toLocaleString('en-GB')}</span> gates on <span className="num">{spec.circuit.qubits}</span> qubits, applied in order to |0…0⟩; each target is ⟨ψ|O|ψ⟩ in the final state |ψ⟩. The gate list is in the JSON spec and in the OpenQASM 3 file of the instance <code>base</code>.</p>
        <GateConventions />
      </Panel>
    );
  }
  const k = spec.circuit;
  const thetaJ = k.thetaJ ?? DEFAULT_THETA_J;
  return (
    <Panel title="Circuit" id="spec-circuit" description="Kicked transverse-field Ising: first-order Trotter steps from |0…0⟩.">
      <div className="space-y-3 text-sm" data-testid="circuit-formula">
        <p className="overflow-x-auto rounded border border-rule bg-paper px-3 py-2 font-serif text-base whitespace-nowrap">
          ⟨<i>O</i>⟩<sub><i>t</i></sub> = ⟨0…0| (<i>U</i><sup>†</sup>)<sup><i>t</i></sup> <i>O</i> <i>U</i><sup><i>t</i></sup> |0…0⟩,&ensp;
          <i>U</i> = ∏<sub>⟨<i>ij</i>⟩∈<i>E</i></sub> R<sub>ZZ</sub><sup>(<i>ij</i>)</sup>(θ<sub>J</sub>) · ∏<sub><i>q</i></sub> R<sub>X</sub><sup>(<i>q</i>)</sup>(θ<sub>h</sub>)
        </p>
        <p>
          Each step applies R<sub>X</sub>(θ<sub>h</sub>) to every qubit, then R<sub>ZZ</sub>(θ<sub>J</sub>) to every coupling of the lattice, in{' '}
          <span className="num">{colours}</span> edge-colour layers (all R<sub>ZZ</sub> gates commute: the colouring sets the depth, not the values).
          An instance id reads <code>t</code><i>steps</i><code>-h</code><i>θ<sub>h</sub></i> (six decimals), e.g. <code>{c.instances[0]?.key}</code>; a target id adds <code>:</code><i>observable</i>.
        </p>
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
          <dt className="text-ink-soft">θ<sub>J</sub></dt>
          <dd className="num">{formatAngle(thetaJ)} <span className="text-ink-soft">({formatSig(thetaJ, 7)} rad{k.thetaJ === undefined ? ', the default' : ''})</span></dd>
          <dt className="text-ink-soft">θ<sub>h</sub></dt>
          <dd className="num">{k.thetaH.map((t) => formatAngle(t)).join(', ')}</dd>
          <dt className="text-ink-soft">Steps <i>t</i></dt>
          <dd className="num">{k.steps.join(', ')}</dd>
        </dl>
        <GateConventions />
      </div>
    </Panel>
  );
}

function GateConventions() {
  return (
    <div className="text-sm">
      <h3 className="mt-2 text-sm font-semibold">Gate conventions</h3>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        <li>R<sub>X</sub>(θ) = exp(−iθX/2); R<sub>Z</sub>(θ) = exp(−iθZ/2); R<sub>ZZ</sub>(θ) = exp(−iθ Z⊗Z/2). At θ<sub>J</sub> = −π/2, R<sub>ZZ</sub> is a Clifford gate.</li>
        <li>The OpenQASM 3 files define <code className="text-xs">{RZZ_DEFINITION}</code>, which equals exp(−iθ Z⊗Z/2) exactly.</li>
        <li>Qubits are numbered from 0; the initial state is |0…0⟩ (Z = +1 on every qubit); a target is the exact expectation value, without shot noise.</li>
      </ul>
    </div>
  );
}

/** every observable written out */
export function ObservablesPanel({ c, all = false }: { c: ChallengeDetail; all?: boolean }) {
  const parsed = useMemo(() => parseObservables(c), [c]);
  const [more, setMore] = useState(all);
  const rows = more ? c.observables : c.observables.slice(0, 16);
  return (
    <Panel title="Observables" id="spec-observables" description={<>Each target is the expectation value of one of these <span className="num">{c.observables.length}</span> observables (Pauli letters carry their qubit as a subscript).</>}>
      <Table aria-label="Observables" data-testid="observables">
        <thead><tr><Th>Id</Th><Th>Observable</Th><Th num>Weight</Th><Th num>Bound on |⟨O⟩|</Th></tr></thead>
        <tbody>
          {rows.map((o) => {
            const p = parsed.get(o.key);
            const label = (o.spec as { label?: string }).label;
            return (
              <tr key={o.key}>
                <Td><code className="text-xs">{o.key}</code>{label && <span className="block text-xs text-ink-soft">{label}</span>}</Td>
                <Td><ObservableFormula o={p} max={all ? 1000 : 6} /></Td>
                <Td num>{p ? supportOf(p).size : '—'}</Td>
                <Td num>{o.bound === null ? '—' : formatSig(o.bound, 4)}</Td>
              </tr>
            );
          })}
        </tbody>
      </Table>
      {!all && c.observables.length > 16 && (
        <button type="button" className={buttonClass('ghost', 'sm', 'mt-2')} onClick={() => setMore(!more)} aria-expanded={more}>
          {more ? 'Show fewer' : `Show all ${c.observables.length} observables`}
        </button>
      )}
    </Panel>
  );
}

/** how the lattice numbers its qubits (shared/physics/lattices.ts, latticeNumbering) */
export function NumberingPanel({ c, hint = true }: { c: ChallengeDetail; hint?: boolean }) {
  const spec = c.spec as unknown as ChallengeSpec;
  const ranges = latticeNumbering(spec.lattice as LatticeSpec);
  const l = spec.lattice as LatticeSpec;
  const size = l.kind === 'square' || l.kind === 'heavy-hex' ? `${l.rows} × ${l.cols}` : `n = ${l.n}`;
  return (
    <Panel title="Qubit numbering" id="spec-numbering" description={<>{l.kind}, {size}: <span className="num">{c.lattice.qubits}</span> qubits</>}>
      <ul className="space-y-1.5 text-sm" data-testid="numbering">
        {ranges.map((r) => (
          <li key={r.from}><span className="num font-medium whitespace-nowrap">{r.from === r.to ? r.from : `${r.from}–${r.to}`}</span>: {r.what}</li>
        ))}
      </ul>
      {hint && <p className="mt-2 text-xs text-ink-soft">&ldquo;Show qubit numbers&rdquo; below the drawing writes them on the lattice.</p>}
    </Panel>
  );
}

export function InstancesPanel({ c, showAll = false }: { c: ChallengeDetail; showAll?: boolean }) {
  const [all, setAll] = useState(showAll);
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
      {!showAll && c.instances.length > 12 && (
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

const JOB_LABEL: Record<string, string> = { references: 'Exact references', 'demo-entries': 'Demo entries', standings: 'Standings', baseline: 'House baseline', 'tn-slices': 'Exact reference (tensor-network slice job)' };

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
