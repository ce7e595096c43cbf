import { useQuery } from '@tanstack/react-query';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { CopyButton, Panel, buttonClass } from '@/components/ui';

const base = (slug: string) => `/api/challenges/${encodeURIComponent(slug)}`;

export default function ExportsSection({ c }: { c: ChallengeDetail }) {
  const v = `version=${c.version.version}`;
  const files: { href: string; label: string; note: string; testid?: string }[] = [
    { href: `${base(c.slug)}/export.csv?${v}`, label: 'Estimates (CSV)', note: 'every published estimate, one row each, with its target, entry and scores', testid: 'export-csv' },
    { href: `${base(c.slug)}/export.csv?table=standings&${v}`, label: 'Standings (CSV)', note: 'the ranked table with every metric' },
    { href: `${base(c.slug)}/export.json?${v}`, label: 'Standings, targets and estimates (JSON)', note: 'references with provenance, consensus values and every estimate' },
    { href: `${base(c.slug)}/package.json?${v}`, label: 'Data package', note: 'a manifest of all export files with their sizes and SHA-256' },
    { href: `${base(c.slug)}/spec.json?${v}`, label: 'Challenge spec (JSON)', note: `the exact spec of version ${c.version.version}, checksum sha256:${c.version.checksum.slice(0, 12)}…` },
    { href: `${base(c.slug)}/cite.bib?${v}`, label: 'BibTeX', note: 'a citation of this challenge version' },
    { href: `${base(c.slug)}/CITATION.cff?${v}`, label: 'CITATION.cff', note: 'the same in Citation File Format' },
  ];
  const bib = useQuery({
    queryKey: ['challenges', c.slug, 'cite.bib', c.version.version],
    queryFn: async ({ signal }) => {
      const r = await fetch(`${base(c.slug)}/cite.bib?${v}`, { signal });
      if (!r.ok) throw new Error('The citation could not be loaded.');
      return r.text();
    },
  });
  return (
    <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <Panel title="Downloads" id="exports" description={<>Data licence: <strong>{c.settings.license ?? 'not stated'}</strong>. Cite the challenge version and its checksum when you use the data.</>}>
        <ul className="divide-y divide-rule">
          {files.map((f) => (
            <li key={f.href} className="flex flex-wrap items-center justify-between gap-2 py-2.5">
              <span className="min-w-0">
                <span className="block font-medium">{f.label}</span>
                <span className="block text-sm text-ink-soft">{f.note}</span>
              </span>
              <a href={f.href} download className={buttonClass('secondary', 'sm')} data-testid={f.testid}>Download</a>
            </li>
          ))}
        </ul>
        <p className="mt-3 text-sm text-ink-soft">OpenQASM 3 of each instance is in the Specification view; each entry's own document and BibTeX are on its page.</p>
      </Panel>
      <Panel title="Cite" id="cite" actions={bib.data ? <CopyButton text={bib.data} label="Copy BibTeX" /> : undefined}>
        {bib.isPending ? <p className="text-sm text-ink-soft">Loading…</p> : bib.isError ? <p className="text-sm text-danger">{(bib.error as Error).message}</p> : (
          <pre className="overflow-x-auto rounded bg-paper-sunk p-3 text-xs break-all whitespace-pre-wrap">{bib.data}</pre>
        )}
      </Panel>
    </div>
  );
}
