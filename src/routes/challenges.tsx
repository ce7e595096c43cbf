import { queryClient } from '@/lib/query-client';
import { getChallengesQueryOptions } from '@/features/challenges/api/get-challenges';
import { ChallengeCatalogue } from '@/features/challenges/components/challenge-catalogue';
import { PageHeader } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader() {
  void queryClient.prefetchQuery(getChallengesQueryOptions());
  return null;
}

export function Component() {
  useDocumentTitle('Challenges');
  return (
    <div>
      <PageHeader title="Challenges">
        <p>Every published challenge: its lattice and depth, how many of its targets have an exact reference, and who has answered it so far.</p>
      </PageHeader>
      <ChallengeCatalogue />
    </div>
  );
}
