/**
 * The planner's structure (issue 14): one estimator per method returning structured reasons, the
 * sentences in reasons.ts only, and every rate constant tied to the benchmark that measures it.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { loadChallenge, type ChallengeSpec } from '../../../shared/physics/challenge';
import { Planner, planChallenge, reasonText, type Reason } from '../../../shared/physics/planner';
import * as rates from '../../../shared/physics/planner/rates';
import { checkRate } from '../../../bench/rate-check';

const DIR = 'shared/physics/planner';

/** Source without comments, and without the lines that throw (programming errors, not reasons). */
function code(file: string): string {
  return readFileSync(`${DIR}/${file}`, 'utf8')
    .replace(/\/\*[\s\S]*?\*\//g, '')
    .replace(/\/\/.*$/gm, '')
    .split('\n')
    .filter((l) => !l.includes('throw new Error'))
    .join('\n');
}

describe('planner structure', () => {
  it('sentences are written in reasons.ts only: no other planner file holds a string of three or more words', () => {
    const files = readdirSync(DIR).filter((f) => f.endsWith('.ts'));
    expect(files).toEqual(expect.arrayContaining(['index.ts', 'reasons.ts', 'rates.ts', 'pauli-propagation.ts', 'free-fermion.ts', 'light-cone-statevector.ts', 'statevector.ts', 'tensor-network.ts']));
    const sentence = /(['"`])(?:(?!\1)[^\n])*?[A-Za-z]+ +[A-Za-z]+ +[A-Za-z]+(?:(?!\1)[^\n])*?\1/;
    for (const f of files) {
      if (f === 'reasons.ts') {
        expect(code(f)).toMatch(sentence); // the check does see sentences
        continue;
      }
      expect(code(f).match(sentence)?.[0] ?? null, f).toBeNull();
    }
  });

  it('no planner file walks a light cone of its own: cones come from light-cone.ts', () => {
    for (const f of readdirSync(DIR).filter((x) => x.endsWith('.ts'))) {
      // a backward walk over the gates, or a breadth-first search over the lattice graph
      expect(code(f), f).not.toMatch(/for \(let \w+ = [^;]*- 1; \w+ >= 0; \w+--\)|offsets\[v \+ 1\]/);
    }
  });

  it('every rate constant names its benchmark, which imports it and checks it against the measurement', () => {
    const source = readFileSync(`${DIR}/rates.ts`, 'utf8');
    const names = Object.keys(rates).filter((k) => k.endsWith('_RATE'));
    expect(names.sort()).toEqual(['FREE_FERMION_RATE', 'PROPAGATION_RATE', 'STATEVECTOR_RATE', 'TN_GEMM_RATE', 'TN_STEP_RATE']);
    for (const name of names) {
      // the doc comment right above the constant names the bench file
      const doc = source.slice(0, source.indexOf(`export const ${name} =`)).split('/**').pop() as string;
      const bench = doc.match(/bench\/[\w-]+\.bench\.ts/)?.[0];
      expect(bench, name).toBeDefined();
      expect(existsSync(bench as string), `${bench}`).toBe(true);
      const text = readFileSync(bench as string, 'utf8');
      expect(text, bench).toMatch(new RegExp(`import \\{[^}]*\\b${name}\\b[^}]*\\} from '../shared/physics/planner/rates'`));
      expect(text, bench).toMatch(new RegExp(`checkRate\\('${name}', ${name},`));
    }
  });

  it('checkRate passes within RATE_TOLERANCE either way and fails beyond it', () => {
    expect(rates.RATE_TOLERANCE).toBe(3);
    const quiet = console.log;
    console.log = () => {};
    try {
      expect(checkRate('X', 1e9, 2.9e9, 'u')).toBe(true);
      expect(checkRate('X', 1e9, 1e9 / 2.9, 'u')).toBe(true);
      expect(checkRate('X', 1e9, 3.1e9, 'u')).toBe(false);
      expect(checkRate('X', 1e9, 1e9 / 3.1, 'u')).toBe(false);
      expect(checkRate('X', 1e9, Number.NaN, 'u')).toBe(false);
    } finally {
      console.log = quiet;
    }
  });

  it('each estimate carries its structured reason, and the sentence is reasonText of it', () => {
    const ki = (lattice: ChallengeSpec['lattice'], observables: ChallengeSpec['observables']) =>
      loadChallenge({ id: 't', version: 1, title: 't', description: '', lattice, circuit: { family: 'kicked-ising', steps: [2, 20], thetaH: [0.7] }, observables });
    const plans = [
      ...planChallenge(ki({ kind: 'heavy-hex', rows: 6, cols: 6 }, [{ id: 'z', pauli: 'Z100' }, { id: 'm', terms: [{ coef: 0.5, pauli: 'Z3' }, { coef: 0.5, pauli: 'X90' }] }])),
      ...planChallenge(ki({ kind: 'chain', n: 40 }, [{ id: 'y', pauli: 'Y5' }, { id: 'z', pauli: 'Z20' }])),
    ];
    const codes = new Set<Reason['code']>();
    for (const p of plans) {
      for (const e of p.estimates) {
        expect(e.feasible).toBe(!e.why);
        if (e.why) {
          codes.add(e.why.code);
          expect(e.reason).toBe(reasonText(e.why));
        } else expect(e.reason).toBeUndefined();
      }
      // an infeasible plan's sentence is made of its estimates' sentences
      if (p.method === null) for (const part of (p.reason as string).split('; ')) expect(part === 'not a chain' || part.startsWith('exact Pauli propagation is attempted') || p.estimates.some((e) => e.reason === part), part).toBe(true);
    }
    expect([...codes].sort()).toEqual(expect.arrayContaining(['cone-limit', 'free-fermion-unsupported', 'not-chain', 'register-limit', 'term-bound', 'tn-not-needed', 'tn-not-searched']));
  });

  it('a sum is quoted per term (issue 15): the term bound names the largest single term, as the runner propagates term by term', () => {
    const ch = loadChallenge({
      id: 't', version: 1, title: 't', description: '', lattice: { kind: 'square', rows: 4, cols: 4 },
      circuit: { family: 'kicked-ising', steps: [3], thetaH: [0.6] }, observables: [{ id: 's', terms: [{ coef: 0.5, pauli: 'Z0' }, { coef: 0.5, pauli: 'Z5' }] }],
    });
    const planner = new Planner(ch, { termBudget: 100 });
    const p = planner.plan(ch.targets[0]);
    const pp = p.estimates.find((e) => e.method === 'pauli-propagation')!;
    if (pp.why?.code !== 'term-bound') throw new Error(`expected a term bound, got ${pp.why?.code}`);
    const inst = planner.instance(ch.targets[0].instanceId);
    const [corner, centre] = ch.observables[0].terms.map((t) => planner.termBound(inst, t).log2Terms);
    expect(centre).toBeGreaterThan(corner); // the centre's cone is wider
    expect(pp.why.largestTerm).toEqual({ log2Terms: centre, index: 1 });
    expect(pp.reason).toMatch(/, the largest single term up to [\d,^]+ \(term 2\)$/);
    // a single term quotes no per-term figure
    const one = planChallenge(loadChallenge({ ...ch.spec, observables: [{ id: 'z', pauli: 'Z5' }] }), { termBudget: 100 })[0];
    expect(one.estimates.find((e) => e.method === 'pauli-propagation')!.reason).not.toMatch(/single term/);
  });
});
