import { useState, type FormEvent } from 'react';
import { useApiKeys } from '@/features/teams/api/get-api-keys';
import { useCreateApiKey, type CreatedApiKey } from '@/features/teams/api/create-api-key';
import { useRevokeApiKey } from '@/features/teams/api/revoke-api-key';
import { ApiError, errorMessage } from '@/lib/api-client';
import { formatDate } from '@/lib/format';
import { Button, EmptyState, ErrorState, Field, FormMessage, Spinner, Table, Td, Th } from '@/components/ui';

export function ApiKeysPanel({ teamId }: { teamId: string }) {
  const keys = useApiKeys(teamId);
  const create = useCreateApiKey(teamId);
  const revoke = useRevokeApiKey(teamId);
  const [name, setName] = useState('');
  const [days, setDays] = useState('180');
  const [errors, setErrors] = useState<{ name?: string; days?: string }>({});
  const [fresh, setFresh] = useState<CreatedApiKey | null>(null);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const d = Number(days);
    const errs = {
      name: name.trim() ? (name.trim().length > 32 ? 'At most 32 characters.' : undefined) : 'Give the key a name, e.g. "sweep script".',
      days: days && (!Number.isInteger(d) || d < 1 || d > 365) ? 'A whole number of days from 1 to 365.' : undefined,
    };
    setErrors(errs);
    if (errs.name || errs.days) return;
    create.mutate({ name: name.trim(), ...(days ? { expiresInDays: d } : {}) }, { onSuccess: (k) => { setFresh(k); setName(''); } });
  };
  const err = create.error instanceof ApiError ? create.error : null;

  return (
    <div className="space-y-5">
      {fresh && <FreshKey k={fresh} onDone={() => setFresh(null)} />}
      <form noValidate onSubmit={submit} className="grid items-start gap-3 sm:grid-cols-[minmax(0,1fr)_8rem_auto]" aria-label="Create an API key">
        <Field label="Key name" value={name} onChange={(e) => setName(e.target.value)} error={errors.name ?? err?.problemFor('name')} placeholder="sweep script" maxLength={32} />
        <Field label="Valid for (days)" type="number" inputMode="numeric" min={1} max={365} value={days} onChange={(e) => setDays(e.target.value)} error={errors.days ?? err?.problemFor('expiresInDays')} />
        <div className="sm:pt-6">
          <Button type="submit" busy={create.isPending} className="w-full sm:w-auto">Create key</Button>
        </div>
      </form>
      {create.isError && !err?.problems.length && <FormMessage>{errorMessage(create.error)}</FormMessage>}
      {keys.isPending ? (
        <Spinner label="Loading keys…" />
      ) : keys.isError ? (
        <ErrorState error={keys.error} retry={() => keys.refetch()} />
      ) : keys.data.keys.length === 0 ? (
        <EmptyState title="No API keys">Scripts post estimates with a team key in the <code>x-api-key</code> header.</EmptyState>
      ) : (
        <Table data-testid="api-keys">
          <thead>
            <tr><Th>Name</Th><Th>Starts with</Th><Th num className="hidden sm:table-cell">Created</Th><Th num>Expires</Th><Th num>Last used</Th><Th><span className="sr-only">Actions</span></Th></tr>
          </thead>
          <tbody>
            {keys.data.keys.map((k) => (
              <tr key={k.id}>
                <Td>{k.name ?? '—'}</Td>
                <Td><code>{k.start ?? '—'}…</code></Td>
                <Td num className="hidden whitespace-nowrap sm:table-cell">{formatDate(k.createdAt)}</Td>
                <Td num className="whitespace-nowrap">{formatDate(k.expiresAt)}</Td>
                <Td num className="whitespace-nowrap">{k.lastRequest ? formatDate(k.lastRequest) : 'never'}</Td>
                <Td className="text-right">
                  <Button
                    variant="danger"
                    size="sm"
                    busy={revoke.isPending && revoke.variables === k.id}
                    onClick={() => { if (window.confirm(`Revoke the key "${k.name ?? k.start}"? Scripts using it stop working at once.`)) revoke.mutate(k.id); }}
                  >
                    Revoke
                  </Button>
                </Td>
              </tr>
            ))}
          </tbody>
        </Table>
      )}
      {revoke.isError && <FormMessage>{errorMessage(revoke.error)}</FormMessage>}
    </div>
  );
}

function FreshKey({ k, onDone }: { k: CreatedApiKey; onDone: () => void }) {
  const [copied, setCopied] = useState<string | null>(null);
  const origin = window.location.origin;
  const curl = `curl -H "x-api-key: ${k.key}" ${origin}/api/me`;
  const copy = async (what: string, text: string) => {
    try { await navigator.clipboard.writeText(text); setCopied(what); } catch { setCopied('failed'); }
  };
  return (
    <div className="rounded-card border border-ok/40 bg-ok-soft p-4" data-testid="fresh-key" role="status">
      <p className="font-medium text-ok-ink">Key “{k.name}” created. Copy it now: it is shown only once.</p>
      <div className="mt-3 flex flex-col gap-2 sm:flex-row sm:items-center">
        <code className="block min-w-0 flex-1 overflow-x-auto rounded border border-rule bg-paper-raised px-3 py-2 whitespace-nowrap" data-testid="fresh-key-value">{k.key}</code>
        <Button variant="secondary" size="sm" onClick={() => copy('key', k.key)}>{copied === 'key' ? 'Copied' : 'Copy key'}</Button>
      </div>
      <p className="mt-3 text-sm text-ink-soft">Try it:</p>
      <div className="mt-1 flex flex-col gap-2 sm:flex-row sm:items-center">
        <code className="block min-w-0 flex-1 overflow-x-auto rounded border border-rule bg-paper-raised px-3 py-2 whitespace-nowrap">curl -H "x-api-key: $KEY" {origin}/api/me</code>
        <Button variant="secondary" size="sm" onClick={() => copy('curl', curl)}>{copied === 'curl' ? 'Copied' : 'Copy command'}</Button>
      </div>
      {copied === 'failed' && <p className="mt-2 text-sm text-danger">The browser did not allow copying; select the text and copy it by hand.</p>}
      <Button variant="ghost" size="sm" className="mt-3" onClick={onDone}>I have stored it</Button>
    </div>
  );
}
