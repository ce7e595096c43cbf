/**
 * computeStandings (shared/scoring/standings.ts): the composition of the scores, the consensus,
 * the degrees of equivalence, the ranking and the cost front. Expected values by direct
 * evaluation of the SCORING.md formulas; order invariance as a property test.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { computeStandings, trackCostHours, type StandingsEntryInput, type StandingsInput } from '../../../shared/scoring/standings';
import { CONSENSUS_ESTIMATORS } from '../../../shared/scoring/consensus';
import { EXACT_TOLERANCE } from '../../../shared/scoring/rules';
import { normalCdf, normalPdf } from '../../../shared/scoring/special';

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
    // ranked on the proper score over both targets (u has a consensus of two teams); c did not
    // answer u and scores the worst case 2B = 2 there: (CRPS on v + 2)/2, so it ranks last
    // although its one answer is exact
    const crps = (m: number, sd: number, y: number) => { const z = (y - m) / sd; return sd * (z * (2 * normalCdf(z) - 1) + 2 * normalPdf(z) - 1 / Math.sqrt(Math.PI)); };
    expect(byId.get('c')!.metrics.scoreOverall).toBeCloseTo((crps(0.5, 0.1, 0.5) + 2) / 2, 12);
    expect(byId.get('c')!.coverage.overall).toEqual({ answered: 1, ranked: 2 });
    expect(byId.get('a')!.metrics.scoreVerifiable).toBeCloseTo(crps(0.52, 0.01, 0.5), 12);
    expect(s.entries.map((r) => r.id)).toEqual(['a', 'b', 'c']);
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
    // cost in hours: c = 7200 s QPU = 2 h; the front is on the overall score: b (1 h) and a (2 h,
    // better than b); c (2 h, worse than a: one answer missing) is dominated
    expect(byId.get('c')!.metrics.costHours).toBe(2);
    expect(byId.get('a')!.metrics.scoreOverall!).toBeLessThan(byId.get('b')!.metrics.scoreOverall!);
    expect(s.entries.filter((r) => r.onFront).map((r) => r.id).sort()).toEqual(['a', 'b']);
    expect(s.counts).toEqual({ targets: 2, verifiable: 1, unverifiable: 1, disputed: 0, entries: 3, ranked: 2 });
  });

  it('the accuracy-cost front is drawn per track, each in its own resource (QPU time is never added to CPU hours)', () => {
    // issue 13: a hardware entry's QPU hours and a classical entry's core-hours are different resources
    const s = computeStandings({
      estimator: 'weighted-mean',
      targets: [{ key: 'v', reference: { value: 0.5, uncertainty: 0 } }],
      entries: [
        { ...entry('cheap-classical', { v: [0.6, 0.05] }, { cost: { cpuCoreHours: 1 } }) },
        { ...entry('good-classical', { v: [0.51, 0.01] }, { cost: { cpuCoreHours: 100 } }) },
        // better than cheap-classical, QPU time 50 h: dominated if it were compared with core-hours, on its own front here
        { ...entry('hw', { v: [0.55, 0.03] }, { cost: { qpuSeconds: 50 * 3600 } }), track: 'hardware' as const },
      ],
    });
    expect(s.entries.filter((r) => r.onFront).map((r) => r.id).sort()).toEqual(['cheap-classical', 'good-classical', 'hw']);
    expect(trackCostHours('hardware', { qpuSeconds: 7200, cpuCoreHours: 3 })).toBe(2);
    expect(trackCostHours('classical', { qpuSeconds: 7200, cpuCoreHours: 3, gpuHours: 1 })).toBe(4);
    expect(trackCostHours('classical', { qpuSeconds: 7200 })).toBeNull();
  });

  it('u = 0 is judged with the exact tolerance: one ulp apart agree, 0.1 apart are far outside (finite |d|/U)', () => {
    // rules.ts: u below EXACT_TOLERANCE * B / 2 is raised to it, so U of a pair is sqrt(2) * 1e-10 (B = 1)
    const tol = EXACT_TOLERANCE;
    const s = computeStandings({
      estimator: 'median',
      targets: [{ key: 'u1', reference: null }, { key: 'u2', reference: null }, { key: 'u3', reference: null }],
      entries: [entry('a', { u1: [0.1, 0], u2: [0.3, 0], u3: [0.5, 0.01] }), entry('b', { u1: [0.2, 0], u2: [0.3 + 2 ** -53, 0], u3: [0.52, 0.01] })],
    });
    const ia = s.agreement.entryIds.indexOf('a');
    const ib = s.agreement.entryIds.indexOf('b');
    expect(s.agreement.incompatible[ia][ib]).toBe(0);
    expect(s.agreement.targets[ia][ib]).toBe(3);
    const r1 = 0.1 / (Math.SQRT2 * tol);
    const r2 = (0.3 + 2 ** -53 - 0.3) / (Math.SQRT2 * tol);
    expect(r2).toBeLessThan(1e-5);
    expect(s.agreement.meanRatio[ia][ib]).toBeCloseTo((r1 + r2 + 0.02 / (2 * Math.sqrt(2e-4))) / 3, 0);
    expect(s.targets.find((t) => t.key === 'u2')!.disputed).toBe(false);
  });

  it('tiny uncertainties (1e-170) below the exact tolerance: values 3e-170 apart agree (|d|/U about 0, not lost to U = 0)', () => {
    const s = computeStandings({
      estimator: 'weighted-mean',
      targets: [{ key: 'u', reference: null }],
      entries: [entry('a', { u: [1e-170, 1e-170] }), entry('b', { u: [4e-170, 1e-170] })],
    });
    expect(s.agreement.meanRatio[0][1]).toBeCloseTo(3e-170 / (Math.SQRT2 * EXACT_TOLERANCE), 12);
    // with a tiny observable bound the tolerance is tiny too: 1e-170 is then resolved
    const t = computeStandings({
      estimator: 'weighted-mean',
      targets: [{ key: 'u', reference: null, bound: 1e-165 }],
      entries: [entry('a', { u: [1e-170, 1e-170] }), entry('b', { u: [4e-170, 1e-170] })],
    });
    expect(t.agreement.meanRatio[0][1]).toBeCloseTo(3 / (2 * Math.SQRT2), 12);
  });

  it('property: the order of the entries changes neither ranks nor metrics, for every estimator', () => {
    const arbEst = fc.option(fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0.001, max: 0.3, noNaN: true })), { nil: undefined });
    const arb = fc.record({
      refs: fc.array(fc.option(fc.double({ min: -1, max: 1, noNaN: true }), { nil: null }), { minLength: 1, maxLength: 4 }),
      entries: fc.array(fc.array(arbEst, { minLength: 4, maxLength: 4 }), { minLength: 1, maxLength: 6 }),
      estimator: fc.constantFrom(...CONSENSUS_ESTIMATORS), // median included: its draws are order-free
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
