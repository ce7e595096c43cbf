/** The dry run's score preview: an entry's estimates against the references the public can see. */
import { scoreAgainstReference, scoreSweep, type SweepItem } from '@shared/scoring';
import type { EntryDocument } from './types';

export type PublicReference = { value: number; uncertainty?: number };

export interface ScorePreview {
  exactReferences: number;
  sweep: ReturnType<typeof scoreSweep>;
  targets: { target: string; value: number; uncertainty: number; reference: number; error: number; z: number | null; covered: boolean }[];
  listed: string;
}

/** targetKeys: every target of the version in order; refs: the public exact references by target key. */
export function scorePreview(doc: EntryDocument, targetKeys: Iterable<string>, refs: Map<string, PublicReference>, listLimit = 1000): ScorePreview {
  const est = new Map(doc.estimates.map((e) => [e.target, e]));
  const items: SweepItem[] = [];
  for (const key of targetKeys) {
    const e = est.get(key);
    items.push({ targetId: key, estimate: e ? { value: e.value, uncertainty: e.uncertainty } : undefined, reference: refs.get(key) });
  }
  const sweep = scoreSweep(items);
  const perTarget: ScorePreview['targets'] = [];
  for (const e of doc.estimates) {
    if (perTarget.length >= listLimit) break;
    const r = refs.get(e.target);
    if (!r) continue;
    const s = scoreAgainstReference(e, r);
    perTarget.push({ target: e.target, value: e.value, uncertainty: e.uncertainty, reference: r.value, error: s.error, z: Number.isFinite(s.z) ? s.z : null, covered: s.covered });
  }
  return { exactReferences: refs.size, sweep, targets: perTarget, listed: perTarget.length < sweep.verifiable.scored ? `the first ${perTarget.length} of ${sweep.verifiable.scored}` : 'all' };
}
