/**
 * Follow or stop following a challenge or a team: a signed-in user gets an e-mail when an entry is
 * published, a reference is revealed or computed, or the standings are rescored. Visitors see how
 * to follow (sign in) and, for a challenge, its Atom feed.
 */
import { Link, useLocation } from 'react-router';
import { errorMessage } from '@/lib/api-client';
import { useUser } from '@/features/me/api/get-me';
import { Button } from '@/components/ui';
import { useFollowActions, useFollows, type FollowSubject } from '../api/follows';

export function FollowButton({ subjectType, subjectId, name }: { subjectType: FollowSubject; subjectId: string; name: string }) {
  const { user } = useUser();
  const loc = useLocation();
  const q = useFollows(Boolean(user));
  const { follow, unfollow } = useFollowActions();
  const mine = q.data?.follows.find((f) => f.subjectType === subjectType && f.subjectId === subjectId);
  const feed = subjectType === 'challenge' ? `/api/challenges/${encodeURIComponent(subjectId)}/feed.atom` : null;
  const what = 'new entries, references and rescorings';
  return (
    <span className="inline-flex flex-wrap items-center gap-2 text-sm" data-testid="follow">
      {!user ? (
        <Link to={`/sign-in?next=${encodeURIComponent(loc.pathname)}`} title={`Sign in to get an e-mail about ${what} of ${name}`}>Sign in to follow</Link>
      ) : mine ? (
        <Button size="sm" variant="secondary" busy={unfollow.isPending} onClick={() => unfollow.mutate(mine.id)} aria-pressed="true" title={`You get an e-mail about ${what} of ${name}`}>Following ✓</Button>
      ) : (
        <Button size="sm" variant="secondary" busy={follow.isPending || q.isPending} onClick={() => follow.mutate({ subjectType, subjectId })} aria-pressed="false" title={`Get an e-mail about ${what} of ${name}`}>Follow</Button>
      )}
      {feed && <a href={feed} type="application/atom+xml" data-testid="atom-feed">Atom feed</a>}
      {(follow.isError || unfollow.isError) && <span role="alert" className="text-danger">{errorMessage(follow.error ?? unfollow.error)}</span>}
    </span>
  );
}
