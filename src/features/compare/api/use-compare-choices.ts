import { useChallenge } from '@/features/challenges/api/get-challenge';
import { useEstimates } from '@/features/challenges/api/get-estimates';
import { naturalCompare } from '@/lib/format';

/** the public entries of the challenge, to choose the two sides */
export function useCompareChoices(slug: string) {
  const c = useChallenge(slug);
  const first = c.data?.observables[0]?.key;
  const steps = c.data ? Math.min(...c.data.instances.map((i) => i.params.steps ?? 0)) : undefined;
  // the smallest slice of the estimates: its list of entries is the public one (hidden entries left out)
  const e = useEstimates(slug, { observable: first, steps, raw: 0 }, Boolean(first));
  return (e.data?.entries ?? []).slice().sort((x, y) => naturalCompare(x.label, y.label));
}

