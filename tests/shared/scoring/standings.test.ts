/**
 * computeStandings (shared/scoring/standings.ts): the composition of the scores, the consensus,
 * the degrees of equivalence, the ranking and the cost front. Expected values by direct
 * evaluation of the SCORING.md formulas; order invariance as a property test.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { computeStandings, type StandingsEntryInput, type StandingsInput } from '../../../shared/scoring/standings';
import { CONSENSUS_ESTIMATORS } from '../../../shared/scoring/consensus';

function entry(id: string, est: Record<string, [number, number]>, extra: Partial<StandingsEntryInput> = {}): StandingsEntryInput {
  return {
    id, label: id, teamId: `team-${id}`, teamName: id, track: 'classical', methodFamily: 'other', submittedAt: '2026-01-01T00:00:00Z', isBaseline: false,
    cost: {}, estimates: new Map(Object.entries(est).map(([k, [value, uncertainty]]) => [k, { value, uncertainty, kind: 'statistical' as const }])),
    ...extra,
  };
}

describe('standings', () => {
  it('direct evaluation on 3 entries, one verifiable and one unverifiable target', () => {
    const input: StandingsInput = {
      estimator: 'weighted-mean',
      targets: [{ key: 'v', reference: { value: 0.5, uncertainty: 0 } }, { key: 'u', reference: null }],
      entries: [
        entry('a', { v: [0.52, 0.01], u: [0.3, 0.01] }, { cost: { cpuCoreHours: 2 } }),
        entry('b', { v: [0.45, 0.02], u: [0.32, 0.02] }, { cost: { cpuCoreHours: 1 } }),
        entry('c', { v: [0.5, 0.1] }, { cost: { qpuSeconds: 7200 } }),
      ],
    };
    const s = computeStandings(input);
    const byId = new Map(s.entries.map((r) => [r.id, r]));
    // RMSE on the one verifiable target = |error|
    expect(byId.get('a')!.metrics.rmseVerifiable).toBeCloseTo(0.02, 14);
    expect(byId.get('b')!.metrics.rmseVerifiable).toBeCloseTo(0.05, 14);
    expect(byId.get('c')!.metrics.rmseVerifiable).toBe(0);
    expect(s.entries.map((r) => r.id)).toEqual(['c', 'a', 'b']);
    // consensus of u: weights 1/0.01^2 and 1/0.02^2 -> y = (4 * 0.3 + 0.32)/5 = 0.304, u(y) = 0.01/sqrt(1.25)
    const tu = s.targets.find((t) => t.key === 'u')!;
    expect(tu.value).toBeCloseTo(0.304, 14);
    expect(tu.uncertainty).toBeCloseTo(0.01 / Math.sqrt(1.25), 14);
    expect(tu.chi2).toBeCloseTo(0.02 ** 2 / (0.01 ** 2 + 0.02 ** 2), 12);
    // degrees of equivalence: d_a = -0.004, u^2(d_a) = 1e-4 - 8e-5 -> |d|/U = 0.004 / (2 sqrt(2e-5))
    expect(byId.get('a')!.metrics.agreementMedianRatio).toBeCloseTo(0.004 / (2 * Math.sqrt(2e-5)), 10);
    // pairwise a-b on u: |0.02| / (2 sqrt(0.01^2 + 0.02^2))
    const ia = s.agreement.entryIds.indexOf('a');
    const ib = s.agreement.entryIds.indexOf('b');
    expect(s.agreement.meanRatio[ia][ib]).toBeCloseTo(0.02 / (2 * Math.sqrt(5e-4)), 12);
    expect(s.agreement.targets[ia][ib]).toBe(1);
    // cost in hours: c = 7200 s QPU = 2 h; front: b (1 h, 0.05), c (2 h, 0): a (2 h, 0.02) is dominated by c
    expect(byId.get('c')!.metrics.costHours).toBe(2);
    expect(s.entries.filter((r) => r.onFront).map((r) => r.id).sort()).toEqual(['b', 'c']);
    expect(s.counts).toEqual({ targets: 2, verifiable: 1, unverifiable: 1, disputed: 0, entries: 3 });
  });

  it('two entries that differ while both claim zero uncertainty are counted as incompatible, not hidden', () => {
    // |d| > 0 with U = 0: no finite |d|/U (SCORING.md degrees of equivalence); agreeing at U = 0 is ratio 0
    const s = computeStandings({
      estimator: 'median',
      targets: [{ key: 'u1', reference: null }, { key: 'u2', reference: null }, { key: 'u3', reference: null }],
      entries: [entry('a', { u1: [0.1, 0], u2: [0.3, 0], u3: [0.5, 0.01] }), entry('b', { u1: [0.2, 0], u2: [0.3, 0], u3: [0.52, 0.01] })],
    });
    const ia = s.agreement.entryIds.indexOf('a');
    const ib = s.agreement.entryIds.indexOf('b');
    expect(s.agreement.incompatible[ia][ib]).toBe(1); // u1
    expect(s.agreement.incompatible[ib][ia]).toBe(1);
    expect(s.agreement.targets[ia][ib]).toBe(2); // u2 (ratio 0) and u3
    expect(s.agreement.meanRatio[ia][ib]).toBeCloseTo((0 + 0.02 / (2 * Math.sqrt(2e-4))) / 2, 12);
    expect(s.agreement.incompatible[ia][ia]).toBe(0);
  });

  it('pairwise agreement with tiny uncertainties (1e-170) is resolved, not lost to U = 0', () => {
    const s = computeStandings({
      estimator: 'weighted-mean',
      targets: [{ key: 'u', reference: null }],
      entries: [entry('a', { u: [1e-170, 1e-170] }), entry('b', { u: [4e-170, 1e-170] })],
    });
    // |d| / (2 sqrt(2) u) = 3 / (2 sqrt 2)
    expect(s.agreement.meanRatio[0][1]).toBeCloseTo(3 / (2 * Math.SQRT2), 12);
  });

  it('property: the order of the entries changes neither ranks nor metrics, for every estimator', () => {
    const arbEst = fc.option(fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0.001, max: 0.3, noNaN: true })), { nil: undefined });
    const arb = fc.record({
      refs: fc.array(fc.option(fc.double({ min: -1, max: 1, noNaN: true }), { nil: null }), { minLength: 1, maxLength: 4 }),
      entries: fc.array(fc.array(arbEst, { minLength: 4, maxLength: 4 }), { minLength: 1, maxLength: 6 }),
      estimator: fc.constantFrom(...CONSENSUS_ESTIMATORS.filter((e) => e !== 'median')),
      rot: fc.nat(),
    });
    fc.assert(
      fc.property(arb, ({ refs, entries, estimator, rot }) => {
        const targets = refs.map((r, k) => ({ key: `t${k}`, reference: r === null ? null : { value: r, uncertainty: 0 } }));
        const es = entries.map((row, i) => {
          const est: Record<string, [number, number]> = {};
          row.forEach((x, k) => { if (x && k < targets.length) est[`t${k}`] = x; });
          return entry(`e${i}`, est, { submittedAt: `2026-01-0${1 + (i % 3)}T00:00:00Z`, cost: { cpuCoreHours: i } });
        });
        const r = rot % es.length;
        const a = computeStandings({ estimator, targets, entries: es });
        const b = computeStandings({ estimator, targets, entries: [...es.slice(r), ...es.slice(0, r)] });
        expect(b.entries.map((x) => x.id)).toEqual(a.entries.map((x) => x.id));
        a.entries.forEach((x, i) => {
          const y = b.entries[i];
          for (const k of Object.keys(x.metrics) as (keyof typeof x.metrics)[]) {
            const p = x.metrics[k], q = y.metrics[k];
            if (typeof p === 'number' && typeof q === 'number') expect(Math.abs(p - q), k).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(p)));
            else expect(q, k).toBe(p);
          }
          expect(y.onFront).toBe(x.onFront);
        });
      }),
      { seed: 77, numRuns: 150 },
    );
  });
});
