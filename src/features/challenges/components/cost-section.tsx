import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { EmptyState } from '@/components/ui';

export default function Section({ c }: { c: ChallengeDetail }) {
  return <EmptyState title="Coming">{c.title}</EmptyState>;
}
