import { describe, expect, it } from 'vitest';
import { largestConsistentSubset } from '../../../shared/scoring/lcs';
import { weightedMean } from '../../../shared/scoring/weighted-mean';
import { createRng } from '../../../shared/scoring/prng';
import { coxVector } from './cox';

/** n results scattered by 0.3 of their stated u about 0.3: consistent by a wide margin. */
function noisySet(n: number, seed: number) {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const u = 0.01 * (0.5 + rng.uniform());
    return { value: 0.3 + 0.3 * u * rng.normal(), uncertainty: u };
  });
}

describe('largest consistent subset (Cox 2007)', () => {
  it('a consistent set is kept whole', () => {
    const r = largestConsistentSubset(coxVector);
    expect(r.method).toBe('none-needed');
    expect(r.subset).toEqual([0, 1, 2, 3, 4]);
  });
  it('one gross outlier is dropped, exactly it', () => {
    for (const seed of [1, 2, 3]) {
      const xs = noisySet(12, seed);
      const consistent = weightedMean(xs).test.consistent;
      expect(consistent).toBe(true);
      xs.splice(7, 0, { value: 0.9, uncertainty: 0.01 });
      const r = largestConsistentSubset(xs);
      expect(r.method).toBe('exhaustive');
      expect(r.dropped).toEqual([7]);
      expect(r.mean.test.consistent).toBe(true);
    }
  });
  it('greedy fallback above the exhaustive limit also drops exactly the outlier', () => {
    const xs = noisySet(30, 4);
    xs.splice(11, 0, { value: -0.5, uncertainty: 0.02 });
    const r = largestConsistentSubset(xs);
    expect(r.method).toBe('greedy');
    expect(r.dropped).toEqual([11]);
  });
  it('exhaustive search finds the minimum-chi2 pair', () => {
    // direct evaluation: two clusters {0, 0.01, 0.02} with small u and two outliers at 1 and -1
    const xs = [0, 1, 0.01, -1, 0.02].map((value) => ({ value, uncertainty: 0.01 }));
    const r = largestConsistentSubset(xs);
    expect(r.dropped).toEqual([1, 3]);
    expect(r.subset).toEqual([0, 2, 4]);
    // exhaustive and greedy (limit 0) agree here
    expect(largestConsistentSubset(xs, { exhaustiveLimit: 0 }).dropped).toEqual([1, 3]);
  });
});
