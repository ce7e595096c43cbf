import { describe, expect, it } from 'vitest';
import { accuracyCostFront, rankEntries } from '../../../shared/scoring/ranking';

describe('ranking', () => {
  const entries = [
    { id: 'b', submittedAt: '2026-01-02T00:00:00Z', metrics: { rmseVerifiable: 0.01, agreementMedianRatio: 0.4 } },
    { id: 'a', submittedAt: '2026-01-02T00:00:00Z', metrics: { rmseVerifiable: 0.01, agreementMedianRatio: 0.4 } },
    { id: 'c', submittedAt: '2026-01-01T00:00:00Z', metrics: { rmseVerifiable: 0.01, agreementMedianRatio: 0.4 } },
    { id: 'd', submittedAt: '2026-01-01T00:00:00Z', metrics: { rmseVerifiable: 0.005, agreementMedianRatio: 2 } },
    { id: 'e', submittedAt: '2025-01-01T00:00:00Z', metrics: { rmseVerifiable: undefined, agreementMedianRatio: 0.1 } },
    { id: 'f', submittedAt: '2025-01-01T00:00:00Z', metrics: { rmseVerifiable: 0.01, agreementMedianRatio: 0.3 } },
  ];
  it('default keys, then earlier submission, then id; missing metrics last', () => {
    const r = rankEntries(entries);
    expect(r.map((x) => x.entry.id)).toEqual(['d', 'f', 'c', 'a', 'b', 'e']);
    expect(r.map((x) => x.rank)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(r.map((x) => x.tiedWithPrevious)).toEqual([false, false, false, true, true, false]);
  });
  it('ties are deterministic whatever the input order', () => {
    const ids = rankEntries(entries).map((x) => x.entry.id);
    const rev = rankEntries(entries.slice().reverse()).map((x) => x.entry.id);
    const rot = rankEntries([...entries.slice(3), ...entries.slice(0, 3)]).map((x) => x.entry.id);
    expect(rev).toEqual(ids);
    expect(rot).toEqual(ids);
  });
  it('a chosen primary metric and direction', () => {
    const r = rankEntries(entries, [{ metric: 'agreementMedianRatio', direction: 'desc' }]);
    expect(r[0].entry.id).toBe('d');
    expect(r[r.length - 1].entry.id).toBe('e');
  });
});

describe('accuracy-against-cost front', () => {
  it('non-dominated points, equal points both kept, missing cost set apart', () => {
    const pts = [
      { id: 'cheap-bad', error: 0.1, cost: 1 },
      { id: 'mid', error: 0.05, cost: 10 },
      { id: 'mid-twin', error: 0.05, cost: 10 },
      { id: 'dominated', error: 0.06, cost: 20 },
      { id: 'same-error-costlier', error: 0.05, cost: 30 },
      { id: 'best', error: 0.001, cost: 1000 },
      { id: 'no-cost', error: 0.0001, cost: undefined },
    ];
    const f = accuracyCostFront(pts);
    expect(f.front.map((p) => p.id)).toEqual(['cheap-bad', 'mid', 'mid-twin', 'best']);
    expect(f.dominated.map((p) => p.id).sort()).toEqual(['dominated', 'same-error-costlier']);
    expect(f.unplaced.map((p) => p.id)).toEqual(['no-cost']);
  });
});
