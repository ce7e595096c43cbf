import { Badge, type BadgeTone } from '@/components/ui';
import { formatPercent } from '@/lib/format';
import type { QueueItem } from '../api/get-queue';

/** the automatic checks as badges: what a moderator should look at first */
export function CheckBadges({ item }: { item: QueueItem }) {
  const c = item.checks;
  const out: { tone: BadgeTone; text: string; title: string }[] = [];
  if (!c.schema.ok) out.push({ tone: 'danger', text: `${c.schema.problems.length} invalid`, title: 'estimates that fail the format or the challenge checks' });
  if (c.bounds.count) out.push({ tone: 'danger', text: `${c.bounds.count} outside bounds`, title: '|value| beyond the physical bound of the observable' });
  if (c.outliers.count) out.push({ tone: 'disputed', text: `${c.outliers.count} outliers vs consensus`, title: '|d| > U against the consensus of published entries' });
  if (c.identical.length) out.push({ tone: 'danger', text: `identical to ${c.identical.length} other entr${c.identical.length === 1 ? 'y' : 'ies'}`, title: 'the same values (12 significant digits) as another entry on several targets' });
  if (c.commitment?.unchangedSinceCheck === false) out.push({ tone: 'danger', text: `altered after reveal (commitment: ${c.commitment.result})`, title: 'the estimates changed after the reveal checked them against the commitment: the check no longer holds' });
  else if (c.commitment && c.commitment.result !== 'pending') out.push({ tone: c.commitment.result === 'match' ? 'ok' : 'danger', text: `commitment ${c.commitment.result}`, title: 'checked at the reveal against the hash registered before it; the estimates are frozen since' });
  if (c.coverage.partial) out.push({ tone: 'neutral', text: `partial: ${formatPercent(c.coverage.fraction)} of targets`, title: `${c.coverage.answered} of ${c.coverage.targets} targets answered` });
  if (!c.scores.scored) out.push({ tone: 'neutral', text: 'no exact reference to score', title: 'none of its targets has a public exact reference' });
  if (!out.length) out.push({ tone: 'ok', text: 'checks clear', title: 'no automatic check raised anything' });
  return (
    <span className="flex flex-wrap gap-1" data-testid="check-badges">
      {out.map((b) => <span key={b.text} title={b.title}><Badge tone={b.tone}>{b.text}</Badge></span>)}
    </span>
  );
}
