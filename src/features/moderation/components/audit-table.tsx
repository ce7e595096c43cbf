import { useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { formatDateTime } from '@/lib/format';
import { Button, ErrorState, Spinner, Table, Td, Th, inputClass } from '@/components/ui';
import { useAudit, type AuditFilters } from '../api/get-audit';

const SUBJECTS = ['', 'entry', 'challenge', 'team', 'user', 'target'];
/** uuids shortened to their first block; slugs kept whole */
const short = (id: string) => (/^[0-9a-f]{8}-[0-9a-f-]{27}$/i.test(id) ? `${id.slice(0, 8)}…` : id);

/** The audit log, newest first, filtered by subject, subject id and action; older pages by "before". */
export function AuditTable() {
  const [search] = useSearchParams();
  const initial: AuditFilters = Object.fromEntries(['subjectType', 'subjectId', 'action'].flatMap((k) => (search.get(k) ? [[k, search.get(k)!]] : [])));
  const [f, setF] = useState<AuditFilters>(initial);
  const [draft, setDraft] = useState<AuditFilters>(initial);
  const [pages, setPages] = useState<string[]>([]);
  const q = useAudit({ ...f, before: pages[pages.length - 1] });
  const link = (type: string, id: string) => (type === 'entry' ? `/entries/${id}` : type === 'challenge' ? `/challenges/${id}` : type === 'team' ? `/teams/${id}` : null);
  return (
    <div className="space-y-4">
      <form className="flex flex-wrap items-end gap-2" onSubmit={(e) => { e.preventDefault(); setPages([]); setF(Object.fromEntries(Object.entries(draft).filter(([, v]) => v))); }} aria-label="Filter the audit log">
        <label className="text-sm">Subject<br />
          <select value={draft.subjectType ?? ''} onChange={(e) => setDraft({ ...draft, subjectType: e.target.value })} className={inputClass(false, 'w-32 pr-7', true)}>
            {SUBJECTS.map((s) => <option key={s} value={s}>{s || 'any'}</option>)}
          </select>
        </label>
        <label className="text-sm">Subject id<br /><input value={draft.subjectId ?? ''} onChange={(e) => setDraft({ ...draft, subjectId: e.target.value })} className={inputClass(false, 'w-56 font-mono text-xs', true)} /></label>
        <label className="text-sm">Action<br /><input value={draft.action ?? ''} placeholder="entry.review" onChange={(e) => setDraft({ ...draft, action: e.target.value })} className={inputClass(false, 'w-40 font-mono text-xs', true)} /></label>
        <Button size="sm" type="submit">Filter</Button>
        {Object.keys(f).length > 0 && <Button size="sm" variant="ghost" onClick={() => { setDraft({}); setF({}); setPages([]); }}>Clear</Button>}
      </form>
      {q.isPending ? <Spinner /> : q.isError ? <ErrorState error={q.error} retry={() => q.refetch()} /> : (
        <>
          <Table data-testid="audit-table" className="min-w-[46rem]">
            <thead><tr><Th>When</Th><Th>Who</Th><Th>Action</Th><Th>Subject</Th><Th>Details</Th></tr></thead>
            <tbody>
              {q.data.lines.map((l) => {
                const href = link(l.subjectType, l.subjectId);
                const d = l.details as { reason?: string; decision?: string };
                return (
                  <tr key={l.id}>
                    <Td className="num whitespace-nowrap">{formatDateTime(l.at)}</Td>
                    <Td>{l.actor ?? '—'}</Td>
                    <Td><button type="button" className="font-mono text-xs underline-offset-2 hover:underline" onClick={() => { setDraft({ ...draft, action: l.action }); setF({ ...f, action: l.action }); setPages([]); }}>{l.action}</button></Td>
                    <Td className="text-xs">{l.subjectType} {href ? <Link to={href} title={l.subjectId} className="font-mono">{short(l.subjectId)}</Link> : <span title={l.subjectId} className="font-mono">{short(l.subjectId)}</span>}</Td>
                    <Td className="max-w-md text-xs">
                      {(d.decision || d.reason) && <span className="block">{d.decision && <strong className="font-medium">{d.decision}: </strong>}{d.reason && `“${d.reason}”`}</span>}
                      <details><summary className="cursor-pointer text-ink-soft">JSON</summary><pre className="mt-1 max-w-md overflow-x-auto text-[11px]">{JSON.stringify(l.details, null, 1)}</pre></details>
                    </Td>
                  </tr>
                );
              })}
            </tbody>
          </Table>
          <div className="flex gap-2">
            {pages.length > 0 && <Button size="sm" variant="secondary" onClick={() => setPages((p) => p.slice(0, -1))}>Newer</Button>}
            {q.data.next && <Button size="sm" variant="secondary" onClick={() => setPages((p) => [...p, q.data.next!])}>Older</Button>}
          </div>
        </>
      )}
    </div>
  );
}
