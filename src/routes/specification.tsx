import { Link, useParams } from 'react-router';
import { useChallenge } from '@/features/challenges/api/get-challenge';
import { LatticeDrawing } from '@/features/challenges/components/lattice-drawing';
import { CircuitPanel, InstancesPanel, NumberingPanel, ObservablesPanel } from '@/features/challenges/components/spec-section';
import { ErrorState, PageHeader, PageLoading, Panel, buttonClass } from '@/components/ui';
import { formatDate } from '@/lib/format';
import { useDocumentTitle } from '@/lib/use-document-title';

/**
 * The specification of a challenge on one printable page: what is computed (circuit, gate
 * conventions, every observable), the lattice with its qubit numbers, every instance, the checksum.
 */
export function Component() {
  const { slug = '' } = useParams();
  const q = useChallenge(slug);
  useDocumentTitle(q.data ? `Specification of ${q.data.title}` : 'Specification');
  if (q.isPending) return <PageLoading label="Loading the specification…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to="/challenges">See all challenges</Link></ErrorState>;
  const c = q.data;
  const base = `/challenges/${encodeURIComponent(c.slug)}`;
  return (
    <article className="space-y-6 print:space-y-4" data-testid="specification">
      <PageHeader
        kicker={<><Link to={base} className="print:no-underline">{c.title}</Link> · specification</>}
        title={`Specification of ${c.title}`}
        actions={<button type="button" className={buttonClass('secondary', 'sm', 'print:hidden')} onClick={() => window.print()}>Print</button>}
      >
        <p className="num text-sm">Version {c.version.version}, published {formatDate(c.version.publishedAt)}</p>
        <p className="text-xs break-all">sha256:{c.version.checksum}</p>
      </PageHeader>
      <Panel title="Description" id="spec-print-description">
        <p className="max-w-prose whitespace-pre-line">{c.description}</p>
        {c.settings.license && <p className="mt-2 text-sm text-ink-soft">Data licence {c.settings.license}</p>}
      </Panel>
      <CircuitPanel c={c} />
      <ObservablesPanel c={c} all />
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] print:block">
        <Panel title="Lattice" id="spec-print-lattice" className="break-inside-avoid">
          <LatticeDrawing lattice={c.lattice} title={`Lattice of ${c.title}`} indices />
        </Panel>
        <NumberingPanel c={c} hint={false} />
      </div>
      <InstancesPanel c={c} showAll />
    </article>
  );
}
