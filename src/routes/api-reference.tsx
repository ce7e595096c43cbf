/**
 * The API reference, generated from GET /api/openapi.json (the route table and the JSON Schemas):
 * how to authenticate, the error model, a copy-paste script in Python (standard library only) and
 * curl, how the checksum is made, every route grouped by resource with who may call it, and the
 * fields of an entry document. A page of Parallax's own.
 */
import { useMemo } from 'react';
import { Link } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { CHECKSUM_RECIPE } from '@shared/physics/checksum-recipe';
import { getOpenApiQueryOptions, useOpenApi } from '@/features/api-docs/api/get-openapi';
import { curlExamples, PYTHON_EXAMPLE } from '@/features/api-docs/examples';
import { fieldRows, groupOperations } from '@/features/api-docs/lib/operations';
import { CopyButton, ErrorState, PageHeader, PageLoading, Panel, Table, Td, Th, cx } from '@/components/ui';

export async function loader() {
  void queryClient.prefetchQuery(getOpenApiQueryOptions());
  return null;
}

const METHOD_TONE: Record<string, string> = {
  get: 'border-rule-strong text-ink', post: 'border-exact/50 text-ink', put: 'border-consensus/50 text-ink', patch: 'border-consensus/50 text-ink', delete: 'border-danger/50 text-danger-ink',
};

function Code({ text, label, testId }: { text: string; label: string; testId?: string }) {
  return (
    <div className="relative">
      <div className="absolute top-2 right-2"><CopyButton text={text} label={`Copy ${label}`} /></div>
      <pre className="overflow-x-auto rounded border border-rule bg-paper-sunk p-3 pr-24 text-xs leading-relaxed" data-testid={testId} aria-label={label}><code>{text}</code></pre>
    </div>
  );
}

export function Component() {
  const q = useOpenApi();
  const base = typeof window === 'undefined' ? 'http://localhost:3000' : window.location.origin;
  const groups = useMemo(() => (q.data ? groupOperations(q.data) : []), [q.data]);
  const entryFields = useMemo(() => (q.data ? fieldRows(q.data.components.schemas.Entry) : []), [q.data]);
  return (
    <div>
      <title>API reference · Parallax</title>
      <PageHeader title="API reference">
        <p>Everything the pages do can be done from a script or a notebook. This page is generated from <a href={`${base}/api/openapi.json`}>/api/openapi.json</a> (OpenAPI 3.1, with the JSON Schemas of entries and challenges).</p>
      </PageHeader>
      <div className="grid grid-cols-1 gap-8 lg:grid-cols-[14rem_minmax(0,1fr)]">
        <nav aria-label="On this page" className="text-sm lg:sticky lg:top-4 lg:self-start">
          <ul className="space-y-1">
            <li><a href="#start">Submitting from a script</a></li>
            <li><a href="#auth">Authentication and errors</a></li>
            <li><a href="#checksum">Checksums</a></li>
            <li><a href="#entry-format">The entry document</a></li>
            {groups.map((g) => <li key={g.name}><a href={`#routes-${g.name.replace(/\W+/g, '-')}`}>/api/{g.name}</a></li>)}
          </ul>
        </nav>
        <div className="min-w-0 space-y-8">
          <Panel title="Submitting from a script" id="start">
            <ol className="mb-4 list-decimal space-y-1 pl-5 text-sm">
              <li>A team lead creates an API key on the <Link to="/teams">team page</Link>; it is shown once. Scripts send it in the <code>x-api-key</code> header and act for the team.</li>
              <li>Download the challenge's sample file, <code>GET /api/challenges/&lt;id&gt;/sample-entry.json</code>: every target key, the current version and checksum, placeholder values to replace.</li>
              <li>Check it with the dry run, <code>POST /api/entries/validate</code>: every problem with its JSON pointer, a score preview, nothing stored.</li>
              <li>Store the draft with an <code>Idempotency-Key</code> header (a retry with the same key and body returns the same entry, 200 instead of 201), then submit it.</li>
            </ol>
            <h3 className="mb-2 text-base font-semibold">Python (standard library only)</h3>
            <Code text={PYTHON_EXAMPLE} label="the Python example" testId="python-example" />
            <h3 className="mt-4 mb-2 text-base font-semibold">curl</h3>
            <p className="mb-2 text-sm">Send files with <code>--data-binary @file</code> (or <code>-F file=@file</code>): plain <code>--data</code> strips the line breaks, and error positions then all read line 1.</p>
            <Code text={curlExamples(base, 'ring-36-correlators')} label="the curl example" testId="curl-example" />
          </Panel>

          <Panel title="Authentication and errors" id="auth">
            <ul className="list-disc space-y-1 pl-5 text-sm">
              <li>Reading is public: challenges, targets, references, standings, entries once published, exports and the Atom feed of a challenge (<code>/api/challenges/&lt;id&gt;/feed.atom</code>).</li>
              <li>A team API key (<code>x-api-key</code>) may create, edit, delete (drafts), submit and withdraw its team's entries, nothing else.</li>
              <li>The pages use a session cookie; writes with a cookie must come from this site (Origin check).</li>
              <li>Errors are JSON: <code>{'{"error": {"code", "message", "problems": [{"path", "message"}], "requestId"}}'}</code>; <code>path</code> is the JSON pointer of the field (RFC 6901), and the message says how to fix it.</li>
              <li><code>?incomplete=1</code> on creating or replacing a draft stores a document with problems as a draft that lists them; it cannot be submitted until a valid document replaces it.</li>
            </ul>
          </Panel>

          <Panel title="Checksums" id="checksum">
            <p className="text-sm">An entry names the challenge version it answers by its checksum. The checksum is the {CHECKSUM_RECIPE}</p>
            <p className="mt-2 text-sm"><code>GET /api/challenges/&lt;id&gt;/spec.canonical.json</code> returns exactly those bytes, so <code>sha256sum</code> of that download prints the checksum; <code>spec.json</code> is the same spec indented for reading, and hashes to another value.</p>
          </Panel>

          <Panel title="The entry document" id="entry-format" description="schemas/entry.schema.json: the fields, their types and limits. Uncertainties are standard uncertainties (1σ).">
            {q.isPending ? <PageLoading label="Loading the schema…" /> : q.isError ? <ErrorState error={q.error} retry={() => q.refetch()} /> : (
              <Table data-testid="entry-fields">
                <thead><tr><Th>Field</Th><Th>Type</Th><Th>Limits</Th><Th>Meaning</Th></tr></thead>
                <tbody>
                  {entryFields.map((f) => (
                    <tr key={f.name}>
                      <Td><code className="text-xs">{f.name}</code>{f.required && <span className="ml-1 text-xs text-ink-soft">(required)</span>}</Td>
                      <Td className="text-xs break-words">{f.type}</Td>
                      <Td className="text-xs">{f.notes}</Td>
                      <Td className="text-sm">{f.description}</Td>
                    </tr>
                  ))}
                </tbody>
              </Table>
            )}
          </Panel>

          {q.isPending ? <PageLoading label="Loading the routes…" /> : q.isError ? null : groups.map((g) => (
            <section key={g.name} id={`routes-${g.name.replace(/\W+/g, '-')}`} aria-labelledby={`h-routes-${g.name}`} className="space-y-3">
              <h2 id={`h-routes-${g.name}`} className="text-xl">/api/{g.name}</h2>
              <ul className="divide-y divide-rule rounded border border-rule" data-testid="api-operations">
                {g.operations.map((o) => (
                  <li key={o.id} id={o.id} className="px-3 py-3">
                    <p className="flex flex-wrap items-baseline gap-2">
                      <span className={cx('rounded border px-1.5 text-xs font-semibold', METHOD_TONE[o.method] ?? 'border-rule')}>{o.method.toUpperCase()}</span>
                      <code className="text-sm break-all">{o.path}</code>
                    </p>
                    <p className="mt-1 text-sm">{o.op.summary}</p>
                    <p className="mt-1 text-xs text-ink-soft">{o.op.description}{o.body && <> Body: {o.body === 'Entry' ? <a href="#entry-format">an entry document</a> : o.body === 'Challenge' ? 'a challenge spec (schemas/challenge.schema.json)' : 'a JSON object'}.</>}</p>
                  </li>
                ))}
              </ul>
            </section>
          ))}
        </div>
      </div>
    </div>
  );
}
