/**
 * The scoring rules of issue 11 (shared/scoring/rules.ts), as properties (fast-check, fixed seeds):
 * propriety of the ranking scores (checked numerically by quadrature: an honest forecaster's
 * expected score never improves when u is multiplied by k > 1, Gneiting and Raftery 2007),
 * closed forms against their defining integrals, coverage (a partial entry never outranks a
 * complete one that is as good on the shared targets), exact answers with rounding noise,
 * one result per team, order invariance of the standings and finite results for u spanning
 * [1e-300, 1e15] in one set. Closed-form check values are direct evaluation (named beside them).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { crpsCensoredNormal, expectedCrpsNormal } from '../../../shared/scoring/proper';
import { crpsNormal } from '../../../shared/scoring/exact';
import { normalCdf } from '../../../shared/scoring/special';
import { consensus, CONSENSUS_ESTIMATORS } from '../../../shared/scoring/consensus';
import { degreesOfEquivalence } from '../../../shared/scoring/equivalence';
import { computeStandings, PRIMARY_METRICS, rankRows, type StandingsEntryInput } from '../../../shared/scoring/standings';
import { EXACT_TOLERANCE, findNearCopies } from '../../../shared/scoring/rules';

/** Simpson's rule on [a, b] with n (even) intervals. */
function simpson(f: (x: number) => number, a: number, b: number, n = 2000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}
const gauss = (y: number, m: number, s: number) => Math.exp(-0.5 * ((y - m) / s) ** 2) / (s * Math.sqrt(2 * Math.PI));

function entry(id: string, team: string, est: Record<string, [number, number]>, extra: Partial<StandingsEntryInput> = {}): StandingsEntryInput {
  return {
    id, label: id, teamId: team, teamName: team, track: 'classical', methodFamily: 'other', submittedAt: '2026-01-01T00:00:00Z', isBaseline: false,
    cost: {}, estimates: new Map(Object.entries(est).map(([k, [value, uncertainty]]) => [k, { value, uncertainty, kind: 'statistical' as const }])),
    ...extra,
  };
}

describe('closed forms (direct evaluation against the defining integrals)', () => {
  it('censored CRPS equals integral_{-B}^{B} (Phi((z - m)/s) - 1{y <= z})^2 dz, and 2B is its maximum', () => {
    fc.assert(fc.property(fc.double({ min: -1.5, max: 1.5, noNaN: true }), fc.double({ min: 0.03, max: 2, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true }), (m, s, y) => {
      const B = 1;
      const direct = simpson((z) => normalCdf((z - m) / s) ** 2, -B, y, 2000) + simpson((z) => (normalCdf((z - m) / s) - 1) ** 2, y, B, 2000);
      const v = crpsCensoredNormal(m, s, y, -B, B);
      expect(Math.abs(v - direct)).toBeLessThan(1e-6);
      expect(v).toBeLessThanOrEqual(2 * B);
    }), { seed: 11, numRuns: 60 });
    // inside the range with small s it is the plain CRPS (published check: 1.2 +/- 0.05 at 1.0, B = 10)
    expect(crpsCensoredNormal(1.2, 0.05, 1.0, -10, 10)).toBeCloseTo(0.1717912353, 10);
    expect(crpsCensoredNormal(0.3, 0, 0.1, -1, 1)).toBeCloseTo(0.2, 15);
    expect(crpsCensoredNormal(5, 0, 0.1, -1, 1)).toBeCloseTo(0.9, 15); // u = 0 clamped to the range
  });

  it('expected CRPS over the consensus equals integral CRPS(N(m, s^2), y) N(y; c, uc^2) dy; uc = 0 is the CRPS', () => {
    fc.assert(fc.property(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0, max: 0.5, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0.01, max: 0.5, noNaN: true }), (m, s, c, uc) => {
      const direct = simpson((y) => crpsNormal(m, s, y) * gauss(y, c, uc), c - 10 * uc, c + 10 * uc, 400);
      expect(Math.abs(expectedCrpsNormal(m, s, c, uc) - direct)).toBeLessThan(1e-7);
    }), { seed: 12, numRuns: 30 });
    expect(expectedCrpsNormal(1.2, 0.3, 1.0, 0)).toBeCloseTo(0.1214149132, 10); // SCORING.md check value
  });
});

describe('propriety: inflating or shrinking u never improves an honest expected score', () => {
  it('exact references: Y ~ N(x, u^2) (the entry is honest); E[censored CRPS] at k u is never below that at u', () => {
    fc.assert(fc.property(fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.double({ min: 0.005, max: 0.05, noNaN: true }), fc.double({ min: 1.01, max: 1000, noNaN: true }), fc.boolean(), (x, u, k, up) => {
      const s = up ? k * u : u / k;
      const at = (sd: number) => simpson((y) => crpsCensoredNormal(x, sd, y, -1, 1) * gauss(y, x, u), x - 9 * u, x + 9 * u, 600);
      expect(at(s)).toBeGreaterThanOrEqual(at(u) - 1e-12);
    }), { seed: 21, numRuns: 60 });
  });

  it('against the consensus: the expected score is smallest at the consensus distribution; k u never helps an entry whose u is the consensus u', () => {
    fc.assert(fc.property(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 1e-4, max: 0.5, noNaN: true }), fc.double({ min: 1.01, max: 1e6, noNaN: true }), (c, uc, k) => {
      expect(expectedCrpsNormal(c, k * uc, c, uc)).toBeGreaterThan(expectedCrpsNormal(c, uc, c, uc));
      expect(expectedCrpsNormal(c, uc / k, c, uc)).toBeGreaterThan(expectedCrpsNormal(c, uc, c, uc));
    }), { seed: 22, numRuns: 200 });
  });
});

const arbStandings = fc.record({
  refs: fc.array(fc.option(fc.double({ min: -0.9, max: 0.9, noNaN: true }), { nil: null }), { minLength: 2, maxLength: 5 }),
  entries: fc.array(fc.array(fc.tuple(fc.double({ min: -0.9, max: 0.9, noNaN: true }), fc.double({ min: 0.001, max: 0.3, noNaN: true })), { minLength: 5, maxLength: 5 }), { minLength: 2, maxLength: 5 }),
  estimator: fc.constantFrom(...CONSENSUS_ESTIMATORS),
});

describe('coverage: a missing answer is never better than an answer', () => {
  it('a partial copy of a complete entry (same values on a subset) ranks below it under every metric and track', () => {
    fc.assert(fc.property(arbStandings, fc.array(fc.boolean(), { minLength: 5, maxLength: 5 }), fc.nat(), (g, keep, pick) => {
      const targets = g.refs.map((r, k) => ({ key: `t${k}`, reference: r === null ? null : { value: r, uncertainty: 0 } }));
      const es = g.entries.map((row, i) => entry(`e${i}`, `team${i}`, Object.fromEntries(targets.map((t, k) => [t.key, row[k]])), { submittedAt: `2026-01-0${2 + (i % 3)}T00:00:00Z` }));
      const c = es[pick % es.length];
      const partialEst = Object.fromEntries([...c.estimates].filter((_, k) => keep[k] && k < targets.length).map(([key, v]) => [key, [v.value, v.uncertainty] as [number, number]]));
      if (Object.keys(partialEst).length === targets.length) return; // not partial
      // submitted earlier than everyone: the tie-break on time cannot rescue it
      const p = entry('partial', 'team-partial', partialEst, { submittedAt: '2025-01-01T00:00:00Z' });
      const s = computeStandings({ estimator: g.estimator, targets, entries: [...es, p] });
      for (const m of PRIMARY_METRICS) {
        const ranked = rankRows(s.entries, m);
        const rc = ranked.find((x) => x.row.id === c.id)!.rank!;
        const rp = ranked.find((x) => x.row.id === 'partial')!.rank!;
        expect(rc, m).toBeLessThan(rp);
      }
    }), { seed: 31, numRuns: 120 });
  });
});

describe('exact answers are judged with the stated tolerance', () => {
  it('u = 0 with a few ulps of noise: covered on every target, finite z, score below 1e-14; two such entries agree and no target is disputed', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 2, maxLength: 6 }), fc.array(fc.integer({ min: -4, max: 4 }), { minLength: 6, maxLength: 6 }), fc.boolean(), (truth, ulps, hideHalf) => {
      const targets = truth.map((r, k) => ({ key: `t${k}`, reference: hideHalf && k % 2 ? null : { value: r, uncertainty: 0 } }));
      const noisy = (k: number, sign: number) => truth[k] + sign * ulps[k] * 2 ** -52 * Math.max(1, Math.abs(truth[k]));
      const a = entry('a', 'ta', Object.fromEntries(truth.map((_, k) => [`t${k}`, [noisy(k, 1), 0] as [number, number]])));
      const b = entry('b', 'tb', Object.fromEntries(truth.map((_, k) => [`t${k}`, [noisy(k, -1), 0] as [number, number]])));
      const s = computeStandings({ estimator: 'random-effects-dl', targets, entries: [a, b] });
      for (const row of s.entries) {
        expect(row.metrics.coveredVerifiable).toBe(1);
        expect(Number.isFinite(row.metrics.meanZ2Verifiable!)).toBe(true);
        expect(row.metrics.scoreVerifiable!).toBeLessThan(1e-14);
      }
      expect(s.targets.every((t) => !t.disputed)).toBe(true);
      const ia = s.agreement.entryIds.indexOf('a');
      const ib = s.agreement.entryIds.indexOf('b');
      if (s.agreement.targets[ia][ib] > 0) expect(s.agreement.meanRatio[ia][ib]!).toBeLessThan(1);
      expect(s.exactTolerance).toBe(EXACT_TOLERANCE);
    }), { seed: 41, numRuns: 150 });
  });
});

describe('independence: one result per team', () => {
  it('k near-copies of one team leave every consensus as one copy (the latest) leaves it', () => {
    fc.assert(fc.property(arbStandings, fc.integer({ min: 2, max: 5 }), (g, k) => {
      const targets = g.refs.map((_, j) => ({ key: `t${j}`, reference: null }));
      const es = g.entries.map((row, i) => entry(`e${i}`, `team${i}`, Object.fromEntries(targets.map((t, j) => [t.key, row[j]]))));
      const copies = Array.from({ length: k }, (_, c) => entry(`copy${c}`, 'team0', Object.fromEntries([...es[0].estimates].map(([key, v]) => [key, [v.value + (c + 1) * 1e-11, v.uncertainty] as [number, number]])), { submittedAt: '2025-06-01T00:00:00Z' }));
      const one = computeStandings({ estimator: g.estimator, targets, entries: es });
      const many = computeStandings({ estimator: g.estimator, targets, entries: [...es, ...copies] });
      one.targets.forEach((t, j) => {
        expect(many.targets[j].value).toBe(t.value);
        expect(many.targets[j].uncertainty).toBe(t.uncertainty);
        expect(many.targets[j].teams).toBe(t.teams);
      });
    }), { seed: 51, numRuns: 100 });
  });

  it('one team alone: no consensus, no agreement score, the target is not ranked', () => {
    const s = computeStandings({ estimator: 'random-effects-dl', targets: [{ key: 'u', reference: null }], entries: [entry('a', 'T', { u: [0.5, 0.01] }), entry('b', 'T', { u: [0.5, 0.01] })] });
    expect(s.targets[0]).toMatchObject({ value: null, ranked: false, teams: 1 });
    expect(s.entries.every((r) => r.metrics.scoreAgreement === null && r.metrics.agreementMedianRatio === null)).toBe(true);
  });

  it('near-copies across teams are flagged (values equal to 1e-6 relative on most shared targets), other pairs not', () => {
    const est = (d: number) => ({ t0: [0.5 + d, 0.01], t1: [0.2 + d, 0.01], t2: [-0.3 + d, 0.01], t3: [0.7, 0.01] }) as Record<string, [number, number]>;
    const pairs = findNearCopies([entry('a', 'A', est(0)), entry('b', 'B', est(1e-9)), entry('c', 'C', est(1e-3)), entry('d', 'A', est(0))]);
    expect(pairs.map((p) => [p.a, p.b])).toEqual([['a', 'b'], ['b', 'd']]);
  });
});

describe('the house baseline is a reference row', () => {
  it('never ranked, never in the consensus; its bound is capped at the observable bound', () => {
    const targets = [{ key: 'u', reference: null, bound: 2 }, { key: 'v', reference: { value: 0.1, uncertainty: 0 }, bound: 2 }];
    const base = entry('house', 'house', { u: [0.9, 245], v: [0.1, 0] }, { isBaseline: true });
    const s = computeStandings({ estimator: 'largest-consistent-subset', targets, entries: [entry('a', 'A', { u: [0.3, 0.01], v: [0.12, 0.01] }), entry('b', 'B', { u: [0.5, 0.01], v: [0.1, 0.02] }), base] });
    const row = s.entries.find((r) => r.id === 'house')!;
    expect(row.rank).toBeNull();
    expect(row.isReference).toBe(true);
    expect(row.bound).toEqual({ max: 2, median: 1 });
    expect(s.targets[0].excluded).toContain('house');
    expect(s.entries.filter((r) => r.rank !== null).map((r) => r.rank)).toEqual([1, 2]);
  });
});

describe('order invariance and finite results', () => {
  it('the standings (ranks, scores, rank intervals, consensus) do not depend on the order of entries, for every estimator (median included)', () => {
    fc.assert(fc.property(arbStandings, fc.nat(), (g, rot) => {
      const targets = g.refs.map((r, k) => ({ key: `t${k}`, reference: r === null ? null : { value: r, uncertainty: 0 } }));
      const es = g.entries.map((row, i) => entry(`e${i}`, `team${i % 3}`, Object.fromEntries(targets.map((t, k) => [t.key, row[k]])), { submittedAt: `2026-01-0${1 + (i % 2)}T00:00:00Z` }));
      const r = rot % es.length;
      const a = computeStandings({ estimator: g.estimator, targets, entries: es });
      const b = computeStandings({ estimator: g.estimator, targets, entries: [...es.slice(r), ...es.slice(0, r)] });
      expect(b.entries.map((x) => [x.id, x.rank, x.rankIntervals])).toEqual(a.entries.map((x) => [x.id, x.rank, x.rankIntervals]));
      a.entries.forEach((x, i) => expect(Math.abs((b.entries[i].metrics.scoreOverall ?? 0) - (x.metrics.scoreOverall ?? 0))).toBeLessThanOrEqual(1e-12));
      a.targets.forEach((t, j) => {
        expect(b.targets[j].value === null).toBe(t.value === null);
        if (t.value !== null) expect(Math.abs(b.targets[j].value! - t.value)).toBeLessThanOrEqual(1e-12);
      });
    }), { seed: 61, numRuns: 80 });
  });

  it('u spanning [1e-300, 1e15] in one set: every estimator gives a finite value and uncertainty, Birge-scaled U(d) > 0', () => {
    const arbWide = fc.array(fc.record({ value: fc.double({ min: -1e3, max: 1e3, noNaN: true }), uncertainty: fc.constantFrom(1e-300, 1e-200, 1e-160, 1e-12, 0.01, 1, 1e6, 1e15) }), { minLength: 2, maxLength: 7 });
    fc.assert(fc.property(arbWide, (xs) => {
      for (const e of CONSENSUS_ESTIMATORS) {
        const c = consensus(xs, e, { median: { trials: 40 } });
        expect(Number.isFinite(c.value), `${e} value`).toBe(true);
        expect(Number.isFinite(c.uncertainty), `${e} u`).toBe(true);
        expect(Number.isFinite(c.tau2), `${e} tau2`).toBe(true);
      }
      // (Birge scaling is not checked here: results 1e154 standard uncertainties apart overflow
      // chi2, and R_B u(y) is then rightly infinite)
    }), { seed: 71, numRuns: 200 });
    // Birge scaling (R_B > 1): U(d_i) > 0 for every result, also the dominant one (scaling the
    // consensus alone would give u_i^2 - R_B^2 u^2(y) < 0, clamped to U = 0). Uncertainties within
    // a range where u(d) is representable at all (u_i (u_i/u_j) above the smallest double)
    const arbDiscrepant = fc.array(fc.record({ value: fc.double({ min: -1, max: 1, noNaN: true }), uncertainty: fc.constantFrom(1e-12, 1e-6, 1e-3, 0.01, 1) }), { minLength: 2, maxLength: 7 });
    fc.assert(fc.property(arbDiscrepant, (xs) => {
      for (const e of ['weighted-mean', 'largest-consistent-subset'] as const) {
        const c = consensus(xs, e, { birgeScaling: true });
        if (!(c.birgeScale! > 1)) continue;
        for (const d of degreesOfEquivalence(xs, c)) if (c.included.includes(d.index)) expect(d.U, e).toBeGreaterThan(0);
      }
    }), { seed: 72, numRuns: 300 });
  });

  it('one entry with u = 1e-160 beside u = 0.01 (the case of issue 11): random effects stay finite, mu near the precise result', () => {
    const xs = [{ value: 0.5, uncertainty: 1e-160 }, { value: 0.51, uncertainty: 0.01 }, { value: 0.49, uncertainty: 0.01 }, { value: 0.6, uncertainty: 0.01 }];
    const c = consensus(xs, 'random-effects-dl');
    expect(Number.isFinite(c.value) && Number.isFinite(c.uncertainty)).toBe(true);
    // direct evaluation: Q ~ 1e316 (overflow is fine), tau = sqrt(sum of the others' squared
    // offsets from 0.5 / sum of their weights...) is of order 0.05; mu within the data
    expect(c.value).toBeGreaterThanOrEqual(0.49);
    expect(c.value).toBeLessThanOrEqual(0.6);
    expect(Math.sqrt(c.tau2)).toBeGreaterThan(0.01);
    expect(Math.sqrt(c.tau2)).toBeLessThan(0.1);
  });
});
