import { Fragment } from 'react';
import { Link, useParams, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { getOutboxMessageQueryOptions, useOutboxMessage } from '@/features/admin/api/get-outbox-message';
import { formatDateTime } from '@/lib/format';
import { Card, ErrorState, PageHeader, PageLoading } from '@/components/ui';

export async function loader({ request, params }: LoaderFunctionArgs) {
  await requireUser(request, ['admin']);
  void queryClient.prefetchQuery(getOutboxMessageQueryOptions(params.messageId!));
  return null;
}

const URL_RE = /(https?:\/\/[^\s<>"']+)/g;

/** plain text with its http(s) links made clickable; nothing else is interpreted */
function Linkified({ text }: { text: string }) {
  const parts = text.split(URL_RE);
  return (
    <>
      {parts.map((p, i) =>
        i % 2 === 1 ? (
          <a key={i} href={p} className="break-all text-classical-ink" data-testid="mail-link">{p}</a>
        ) : (
          <Fragment key={i}>{p}</Fragment>
        ),
      )}
    </>
  );
}

export function Component() {
  const { messageId = '' } = useParams();
  const q = useOutboxMessage(messageId);
  if (q.isPending) return <PageLoading />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  const m = q.data;
  return (
    <div>
      <PageHeader title={m.subject || '(no subject)'} kicker={<Link to="/admin/outbox">Outbox</Link>} />
      <Card className="max-w-prose p-4 sm:p-6">
        <dl className="mb-4 grid grid-cols-[4rem_minmax(0,1fr)] gap-y-1 border-b border-rule pb-4 text-sm">
          <dt className="text-ink-soft">From</dt><dd className="break-all">{m.from}</dd>
          <dt className="text-ink-soft">To</dt><dd className="break-all">{m.to}</dd>
          <dt className="text-ink-soft">Received</dt><dd className="num">{formatDateTime(m.receivedAt)}</dd>
        </dl>
        <div className="text-base whitespace-pre-wrap" data-testid="mail-text">
          {m.text ? <Linkified text={m.text} /> : <span className="text-ink-soft">This message has no plain-text part.</span>}
        </div>
      </Card>
    </div>
  );
}
