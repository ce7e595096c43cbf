/**
 * The unfollow link of a follow mail: no sign-in (the token in the link names the follow); one
 * button, so that a mail scanner opening the link changes nothing.
 */
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { errorMessage } from '@/lib/api-client';
import { unfollowByToken } from '@/features/follows/api/follows';
import { Button, FormMessage, PageHeader } from '@/components/ui';

export function Component() {
  const { token = '' } = useParams();
  const [state, setState] = useState<{ kind: 'ask' | 'busy' } | { kind: 'done'; subjectType: string; subjectId: string } | { kind: 'error'; text: string }>({ kind: 'ask' });
  const go = () => {
    setState({ kind: 'busy' });
    unfollowByToken(token).then(
      (r) => setState({ kind: 'done', subjectType: r.subjectType, subjectId: r.subjectId }),
      (e) => setState({ kind: 'error', text: errorMessage(e) }),
    );
  };
  return (
    <div>
      <title>Stop following · Parallax</title>
      <PageHeader title="Stop following">
        <p>No more e-mail about new entries, references and rescorings of what this link was sent for.</p>
      </PageHeader>
      {state.kind === 'ask' || state.kind === 'busy' ? (
        <Button onClick={go} busy={state.kind === 'busy'}>Stop following</Button>
      ) : state.kind === 'error' ? <FormMessage tone="danger">{state.text}</FormMessage> : state.kind === 'done' && (
        <FormMessage tone="ok">
          You no longer follow {state.subjectType === 'challenge' ? <Link to={`/challenges/${state.subjectId}`}>the challenge {state.subjectId}</Link> : <Link to={`/teams/${state.subjectId}`}>this team</Link>}.
        </FormMessage>
      )}
    </div>
  );
}
