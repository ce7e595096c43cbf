import { useState } from 'react';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Button, FormMessage, Segmented, TextAreaField } from '@/components/ui';
import { useDecideEntry, type Decision } from '../api/decide-entry';

const LABEL: Record<Decision, string> = { publish: 'Publish', return: 'Return to the team', reject: 'Reject' };
const HINT: Record<Decision, string> = {
  publish: 'It enters the standings at once. The team reads the reason in the e-mail.',
  return: 'The team can edit and resubmit it. Say what to change: they read it in the e-mail and on My entries.',
  reject: 'Final for this entry. Say why; the team reads it.',
};

/**
 * Publish, return or reject with a required reason. A 409 means another moderator decided first:
 * the message says who and when, and the queue refreshes (onConflict).
 */
export function DecisionForm({ entryId, onDecided, onConflict }: { entryId: string; onDecided: (d: Decision) => void; onConflict: (message: string) => void }) {
  const [decision, setDecision] = useState<Decision>('publish');
  const [reason, setReason] = useState('');
  const [missing, setMissing] = useState(false);
  const m = useDecideEntry();
  return (
    <form
      className="space-y-3"
      data-testid="decision-form"
      onSubmit={(e) => {
        e.preventDefault();
        if (!reason.trim()) { setMissing(true); return; }
        // mutateAsync, not mutate's callbacks: the refreshed queue may unmount this form first
        m.mutateAsync({ entryId, decision, reason: reason.trim() }).then(
          () => onDecided(decision),
          (err) => { if (err instanceof ApiError && err.status === 409) onConflict(err.message); },
        );
      }}
    >
      <Segmented label="Decision" value={decision} onChange={(d) => setDecision(d)} options={(['publish', 'return', 'reject'] as const).map((d) => ({ value: d, label: LABEL[d] }))} />
      <TextAreaField
        label="Reason"
        rows={3}
        maxLength={2000}
        value={reason}
        onChange={(e) => { setReason(e.target.value); setMissing(false); }}
        hint={HINT[decision]}
        error={missing ? 'Give a reason: the team reads it.' : m.error instanceof ApiError ? m.error.problemFor('/reason') : undefined}
      />
      {m.isError && !(m.error instanceof ApiError && (m.error.status === 409 || m.error.problemFor('/reason'))) && <FormMessage>{errorMessage(m.error)}</FormMessage>}
      <Button type="submit" variant={decision === 'reject' ? 'danger' : 'primary'} busy={m.isPending}>{LABEL[decision]}</Button>
    </form>
  );
}
