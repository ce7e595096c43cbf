import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { CompiledCircuit, GateName } from '../../../shared/physics/circuit';
import { loadChallenge, type ChallengeSpec, type GateJson } from '../../../shared/physics/challenge';
import { compileInstance, compileLattice } from '../../../shared/physics/compile';
import { graphBall, lightCone } from '../../../shared/physics/light-cone';
import { freeFermionSites, Planner, planChallenge } from '../../../shared/physics/planner';
import { parsePauli } from '../../../shared/physics/observable';
import { ENGINE_VERSION, ReferenceRunner, type ReferenceValue } from '../../../shared/physics/reference';
import { statevectorExpectation } from '../../../shared/physics/statevector';

const HALF_PI = Math.PI / 2;
const fixture = (name: string) => JSON.parse(readFileSync(`tests/fixtures/challenges/${name}.json`, 'utf8')) as ChallengeSpec;
const ki = (lattice: ChallengeSpec['lattice'], steps: number[], thetaH: number[], observables: ChallengeSpec['observables'], thetaJ?: number) =>
  loadChallenge({
    id: 'test', version: 1, title: 'test', description: '', lattice,
    circuit: { family: 'kicked-ising', steps, thetaH, ...(thetaJ === undefined ? {} : { thetaJ }) },
    observables,
  });
const value = (r: ReturnType<ReferenceRunner['run']>): number => {
  if (r.value === null) throw new Error(`no value: ${r.reason}`);
  return r.value;
};

describe('planner choices', () => {
  it('a chain picks free-fermion or Pauli propagation as the cheapest method', () => {
    const c = ki({ kind: 'chain', n: 64 }, [2, 4, 8], [0.3, 0.785398, 1.2], [
      { id: 'z32', pauli: 'Z32' }, { id: 'x10', pauli: 'X10' }, { id: 'zz', pauli: 'Z20 Z21' },
      { id: 'mz', terms: Array.from({ length: 64 }, (_, i) => ({ coef: 1 / 64, pauli: `Z${i}` })) },
    ]);
    for (const p of planChallenge(c)) {
      expect(['free-fermion', 'pauli-propagation'], p.targetId).toContain(p.method);
      expect(p.reason).toBeNull();
    }
    // causal sub-chains (PHYSICS.md: radius t - 1 around Z, t around X), clipped at the ends
    const sites = (pauli: string) => freeFermionSites(64, 4, { id: 'o', terms: [{ coef: 1, factors: parsePauli(pauli, 64) }] });
    expect(sites('Z32')).toBe(7);
    expect(sites('X10')).toBe(9);
    expect(sites('Z0')).toBe(4);
    expect(sites('Z20 Z21')).toBe(8);
  });

  it('the Clifford point of a 1000-qubit heavy-hex uses propagation, and PHYSICS.md values come out', () => {
    // 13 x 14 cells: 5*13*14 + 4*13 + 4*14 - 1 = 1017 qubits
    const c = ki({ kind: 'heavy-hex', rows: 13, cols: 14 }, [1, 3, 6], [0, HALF_PI, Math.PI], [
      { id: 'z500', pauli: 'Z500' }, { id: 'z3', pauli: 'Z3' }, { id: 'x7z8', pauli: 'X7 Z8' },
    ]);
    expect(c.nQubits).toBe(1017);
    const runner = new ReferenceRunner(c);
    for (const t of c.targets) {
      const p = runner.plan(t);
      expect(p.clifford).toBe(true);
      expect(p.method, p.targetId).toBe('pauli-propagation');
      const r = runner.run(t, p) as ReferenceValue;
      expect(r.method).toBe('pauli-propagation');
      expect(r.engineVersion).toBe(ENGINE_VERSION);
      const inst = runner.planner.instance(t.instanceId);
      if (inst.params.family !== 'kicked-ising') throw new Error('family');
      const { steps, thetaH } = inst.params;
      // PHYSICS.md: thetaH = 0: Z strings 1, X/Y strings 0; thetaH = pi/2: <Z_q> = 0 (t >= 1),
      // every Pauli value in {-1, 0, 1}; thetaH = pi: <Z_q> = (-1)^t.
      if (t.observableId !== 'x7z8') {
        if (thetaH === 0) expect(r.value).toBe(1);
        if (thetaH === HALF_PI) expect(r.value).toBeCloseTo(0, 12);
        if (thetaH === Math.PI) expect(r.value).toBeCloseTo((-1) ** steps, 12);
      } else if (thetaH === 0) expect(r.value).toBe(0);
      expect([-1, 0, 1].some((v) => Math.abs(r.value - v) < 1e-12)).toBe(true);
      expect(r.size).toBe(1); // Clifford: one term all the way
      expect(r.detail).toMatch(/^exact Pauli propagation at a Clifford point \(no branching\), no truncation, 1 term in all/);
      // issue 15: a cone of at most 20 qubits is cross-checked by contraction
      if (p.cone.qubits <= 20) {
        expect(r.crossCheck?.method).toBe('tensor-network');
        expect(r.crossCheck!.absDiff).toBeLessThan(1e-10);
      }
    }
  });

  it('a deep generic circuit on a 10 x 10 square grid is infeasible, with a reason', () => {
    const gates: GateJson[] = [];
    let seed = 3;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    const lat = compileLattice({ lattice: { kind: 'square', rows: 10, cols: 10 } } as ChallengeSpec);
    for (let layer = 0; layer < 20; layer++) {
      for (let q = 0; q < 100; q++) gates.push({ name: (['rx', 'ry'] as GateName[])[layer % 2], qubits: [q], params: [0.1 + rnd()] });
      for (const [a, b] of lat.colourLayers[layer % 4]) gates.push({ name: 'cz', qubits: [a, b] });
    }
    const c = loadChallenge({
      id: 'deep', version: 1, title: 'deep', description: '', lattice: { kind: 'square', rows: 10, cols: 10 },
      circuit: { family: 'gates', qubits: 100, gates }, observables: [{ id: 'z55', pauli: 'Z55' }],
    });
    const [p] = planChallenge(c);
    expect(p.method).toBeNull();
    expect(p.reason).toMatch(/^light cone has 100 qubits \(limit 27\) and \d[\d,]* non-Clifford rotations/);
    expect(p.reason).toMatch(/not a chain/);
    // issue 15: exact propagation is attempted under the term budget and a time cap (a tenth of
    // the budget here), then abandoned; the reason keeps the plan's and adds the attempt's
    expect(p.reason).toMatch(/exact Pauli propagation is attempted under the budget of 1,000,000 terms/);
    const r = new ReferenceRunner(c, { secondsBudget: 10 }).run(c.targets[0]);
    expect(r.value).toBeNull();
    if (r.value === null) expect(r.reason).toMatch(/Pauli propagation (overran|: term 1 outgrew)/);
  });

  it('deep kicked-ising on a large heavy-hex off the Clifford point is infeasible with a plain reason', () => {
    const c = ki({ kind: 'heavy-hex', rows: 6, cols: 6 }, [20], [0.7], [{ id: 'z100', pauli: 'Z100' }]);
    const [p] = planChallenge(c);
    expect(p.method).toBeNull();
    expect(p.reason).toMatch(/light cone has \d+ qubits \(limit 27\) and \d[\d,]* non-Clifford rotations.*; not a chain/);
  });

  it('plans a 1,000-target challenge (timing is in bench/planner.bench.ts)', () => {
    const obs = Array.from({ length: 10 }, (_, i) => ({ id: `z${i * 97}`, pauli: `Z${i * 97}` }));
    const c = ki({ kind: 'heavy-hex', rows: 13, cols: 14 }, [1, 2, 3, 4, 5, 6, 8, 10, 15, 20], [0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, HALF_PI], obs);
    expect(c.targets.length).toBe(1000);
    const plans = planChallenge(c);
    expect(plans.length).toBe(1000);
    expect(plans.filter((p) => p.method === 'pauli-propagation').length).toBeGreaterThan(0);
    expect(plans.filter((p) => p.method === null).length).toBeGreaterThan(0);
    for (const p of plans) expect(p.method !== null || (p.reason ?? '').length > 10).toBe(true);
  });

  it('cone sizes: Z site ball radius t - 1, X site radius t (PHYSICS.md); agrees with light-cone.ts', () => {
    const c = ki({ kind: 'heavy-hex', rows: 3, cols: 3 }, [1, 2, 3, 4], [0.4], [{ id: 'z', pauli: 'Z20' }, { id: 'x', pauli: 'X20' }, { id: 'zx', pauli: 'Z5 X30' }]);
    const planner = new Planner(c);
    const g = planner.lattice.graph;
    for (const t of c.targets) {
      const inst = planner.instance(t.instanceId);
      const obs = planner.observable(t.observableId);
      const steps = inst.params.family === 'kicked-ising' ? inst.params.steps : 0;
      const cone = planner.plan(t).cone;
      const theirs = lightCone(compileInstance(c.spec, inst, planner.lattice), obs);
      expect(cone.qubits, t.id).toBe(theirs.qubits.length);
      expect(cone.gates, t.id).toBe(theirs.keptGates.length);
      expect(cone.nonClifford, t.id).toBe(theirs.nonCliffordRotations); // thetaJ = -pi/2 is Clifford
      const mine = planner.restrict(inst, obs);
      expect(mine.qubits).toEqual(theirs.qubits);
      if (t.observableId === 'z') expect(cone.qubits).toBe(graphBall(g.n, g.edges, [20], steps - 1).length);
      if (t.observableId === 'x') expect(cone.qubits).toBe(graphBall(g.n, g.edges, [20], steps).length);
    }
  });
});

describe('cross-method checks', () => {
  it('free-fermion equals exact Pauli propagation on a 64-site chain', () => {
    const c = ki({ kind: 'chain', n: 64 }, [1, 2, 3, 4], [0.25, 0.8, 1.3], [
      { id: 'z0', pauli: 'Z0' }, { id: 'z31', pauli: 'Z31' }, { id: 'x40', pauli: 'X40' }, { id: 'zz', pauli: 'Z10 Z11' }, { id: 'x63', pauli: 'X63' },
      { id: 'mix', terms: [{ coef: 0.5, pauli: 'Z2' }, { coef: -0.25, pauli: 'X5' }, { coef: 2, pauli: 'Z7 Z8' }] },
    ], -0.9);
    const runner = new ReferenceRunner(c, { termBudget: 5_000_000 });
    let checked = 0;
    for (const t of c.targets) {
      const inst = runner.planner.instance(t.instanceId);
      const obs = runner.planner.observable(t.observableId);
      const ff = runner.runMethod({ method: 'free-fermion' }, inst, obs);
      const pp = runner.runMethod({ method: 'pauli-propagation' }, inst, obs);
      if (!ff.ok || !pp.ok) throw new Error(`${t.id}: ${!ff.ok ? ff.reason : ''} ${!pp.ok ? pp.reason : ''}`);
      expect(ff.value, t.id).toBeCloseTo(pp.value, 10);
      checked++;
    }
    expect(checked).toBe(72);
  });

  it('light-cone statevector equals full statevector on small lattices', () => {
    const lattices: ChallengeSpec['lattice'][] = [
      { kind: 'chain', n: 10 }, { kind: 'ring', n: 9 }, { kind: 'square', rows: 3, cols: 3 }, { kind: 'heavy-hex', rows: 1, cols: 1 },
      { kind: 'edges', n: 8, edges: [[0, 1], [1, 2], [2, 3], [3, 0], [4, 5], [5, 6], [6, 7], [1, 5]] },
    ];
    for (const lattice of lattices) {
      const c = ki(lattice, [1, 2, 3], [0.4, 1.1], [
        { id: 'z1', pauli: 'Z1' }, { id: 'x2', pauli: 'X2' }, { id: 'y0z3', pauli: 'Y0 Z3' },
        { id: 'h', terms: [{ coef: 0.3, pauli: 'Z4' }, { coef: -0.7, pauli: 'X1 X2' }, { coef: 0.1, pauli: 'I' }] },
      ], 0.6);
      const runner = new ReferenceRunner(c);
      for (const t of c.targets) {
        const inst = runner.planner.instance(t.instanceId);
        const obs = runner.planner.observable(t.observableId);
        const lc = runner.runMethod({ method: 'light-cone-statevector' }, inst, obs);
        const sv = runner.runMethod({ method: 'statevector' }, inst, obs);
        if (!lc.ok || !sv.ok) throw new Error('method failed');
        expect(lc.value, `${lattice.kind} ${t.id}`).toBeCloseTo(sv.value, 12);
      }
    }
  });

  it('gates family: every method agrees on the fixture, and the restriction matches the full circuit', () => {
    const c = loadChallenge(fixture('gates-small'));
    const runner = new ReferenceRunner(c);
    for (const t of c.targets) {
      const inst = runner.planner.instance(t.instanceId);
      const obs = runner.planner.observable(t.observableId);
      const full = statevectorExpectation(compileInstance(c.spec, inst), obs).value;
      for (const m of ['pauli-propagation', 'light-cone-statevector', 'statevector'] as const) {
        const r = runner.runMethod({ method: m }, inst, obs);
        if (!r.ok) throw new Error(r.reason);
        expect(r.value, `${t.id} ${m}`).toBeCloseTo(full, 12);
      }
      expect(value(runner.run(t))).toBeCloseTo(full, 12);
    }
  });

  it('symmetry <P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH) holds for the references (PHYSICS.md)', () => {
    const c = ki({ kind: 'heavy-hex', rows: 2, cols: 2 }, [2, 3], [0.5, -0.5], [{ id: 'x', pauli: 'X4' }, { id: 'yz', pauli: 'Y4 Z10' }, { id: 'z', pauli: 'Z12' }]);
    const runner = new ReferenceRunner(c);
    for (const steps of [2, 3]) {
      for (const o of c.observables) {
        const sign = (-1) ** o.terms[0].factors.filter((f) => f.op !== 'Z').length;
        const plus = value(runner.run({ id: '', instanceId: `t${steps}-h0.500000`, observableId: o.id }));
        const minus = value(runner.run({ id: '', instanceId: `t${steps}-h-0.500000`, observableId: o.id }));
        expect(minus).toBeCloseTo(sign * plus, 12);
      }
    }
  });
});

describe('per-term light cones', () => {
  it('a magnetisation sum wider than the cone limit runs one light-cone statevector per term', () => {
    // heavy-hex 3 x 3: 5*9 + 12 + 12 - 1 = 68 qubits; the union cone of mz is the whole register
    const c = ki({ kind: 'heavy-hex', rows: 3, cols: 3 }, [3], [0.7], [
      { id: 'mz', terms: Array.from({ length: 68 }, (_, i) => ({ coef: 1 / 68, pauli: `Z${i}` })) },
    ], 0.35);
    const runner = new ReferenceRunner(c, { termBudget: 10 });
    const p = runner.plan(c.targets[0]);
    expect(p.cone.qubits).toBe(68);
    const lc = p.estimates.find((e) => e.method === 'light-cone-statevector')!;
    expect(lc.feasible).toBe(true);
    expect(lc.perTerm).toBe(true);
    expect(lc.size).toBeLessThanOrEqual(26);
    expect(p.method).toBe('light-cone-statevector');
    const r = runner.run(c.targets[0], p) as ReferenceValue;
    // the same sum, term by term, by exact propagation
    const big = new ReferenceRunner(c, { termBudget: 5_000_000 });
    const inst = big.planner.instance(c.targets[0].instanceId);
    let want = 0;
    for (const t of c.observables[0].terms) {
      const x = big.runMethod({ method: 'pauli-propagation' }, inst, { id: 'one', terms: [{ coef: 1, factors: t.factors }] });
      if (!x.ok) throw new Error(x.reason);
      want += t.coef * x.value;
    }
    expect(r.value).toBeCloseTo(want, 12);
    expect(r.size).toBe(lc.size);
    expect(r.detail).toBe(`light-cone statevector on ${lc.size} of 68 qubits, one run per term (68 terms)`);
  });
});

describe('reference fallbacks', () => {
  it('falls back to the next method when propagation outgrows a tiny term budget', () => {
    const c = ki({ kind: 'square', rows: 3, cols: 3 }, [3], [0.7], [{ id: 'z4', pauli: 'Z4' }], 0.3);
    const runner = new ReferenceRunner(c, { termBudget: 4 });
    const p = runner.plan(c.targets[0]);
    expect(p.estimates.find((e) => e.method === 'pauli-propagation')!.feasible).toBe(false);
    const forced = runner.runMethod({ method: 'pauli-propagation' }, runner.planner.instance(c.targets[0].instanceId), c.observables[0]);
    expect(forced.ok).toBe(false);
    const r = runner.run(c.targets[0]) as ReferenceValue;
    expect(['light-cone-statevector', 'statevector']).toContain(r.method);
    const circ: CompiledCircuit = compileInstance(c.spec, c.instances[0]);
    expect(r.value).toBeCloseTo(statevectorExpectation(circ, c.observables[0]).value, 12);
  });
});

describe('scripts/reference.ts', () => {
  const run = (args: string[]) => spawnSync(process.execPath, ['--import', 'tsx', 'scripts/reference.ts', ...args], { encoding: 'utf8' });

  it('writes one entry per target, with a value or a reason', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'parallax-ref-')), 'out.json');
    const r = run(['tests/fixtures/challenges/chain-small.json', '--out', out]);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/\[60\/60\] t4-h1\.570796:mz/);
    const rows = JSON.parse(readFileSync(out, 'utf8')) as { targetId: string; value: number | null; method: string; params: { steps: number }; size: number }[];
    expect(rows.length).toBe(60);
    expect(rows[0]).toMatchObject({ targetId: 't1-h0.000000:z0', instanceId: 't1-h0.000000', observableId: 'z0', value: 1, params: { steps: 1, thetaH: 0 } });
    for (const row of rows) expect(typeof row.value).toBe('number');
  });

  it('--threads shares the slices of a sliced contraction among threads: the same values, bit for bit, as one thread', () => {
    const dir = mkdtempSync(join(tmpdir(), 'parallax-ref-'));
    const spec = join(dir, 'hex.json');
    // a light cone past the statevector limit (tensor network, width 12), sliced by a memory budget of width 9
    writeFileSync(spec, JSON.stringify({ id: 'hex-threads', version: 1, title: 'hex', description: '', lattice: { kind: 'heavy-hex', rows: 3, cols: 5 },
      circuit: { family: 'kicked-ising', steps: [5], thetaH: [0.7] }, observables: [{ id: 'zs', pauli: 'Z20 Z5 Z25 Z26 Z6 Z47 Z21 Z4' }] }));
    const rows = (threads: number) => {
      const out = join(dir, `out-${threads}.json`);
      const r = run([spec, '--out', out, '--tn-memory-gb', '0.0000458', '--threads', String(threads)]);
      expect(r.status, r.stderr).toBe(0);
      return JSON.parse(readFileSync(out, 'utf8')) as { value: number; method: string; slices: number; width: number }[];
    };
    const one = rows(1), two = rows(2);
    expect(one[0].method).toBe('tensor-network');
    expect(one[0].slices).toBeGreaterThan(1);
    expect(two[0]).toMatchObject({ method: 'tensor-network', slices: one[0].slices, width: one[0].width });
    expect(two[0].value).toBe(one[0].value);
    expect(run([spec, '--threads', '0']).stderr).toMatch(/--threads needs a positive number/);
  });

  it('prints the validation messages and exits 1 on a bad spec', () => {
    const dir = mkdtempSync(join(tmpdir(), 'parallax-ref-'));
    const bad = join(dir, 'bad.json');
    const spec = fixture('chain-small');
    spec.observables.push({ id: 'far', pauli: 'Z99' });
    writeFileSync(bad, JSON.stringify(spec));
    const r = run([bad]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/\/observables\/5\/pauli: observable "far": Pauli string "Z99" at character 2: qubit 99 is out of range/);
  });
});
