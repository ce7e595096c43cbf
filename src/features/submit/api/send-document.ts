/**
 * The entry-document routes take the document as a raw JSON body or as the multipart field
 * "file" (server/routes/entries.ts). The shared api client only sends JSON with GET/POST/DELETE,
 * so this one helper sends a document (object or File) with POST or PUT and maps errors through
 * the same toApiError, so that every form still sees one error model (ApiError with problems).
 */
import { ApiError, toApiError } from '@/lib/api-client';
import type { EntryDocument } from '@/features/entries/api/get-entry';

export type DocumentSource = { kind: 'json'; document: EntryDocument } | { kind: 'file'; file: File };

export async function sendDocument<T>(method: 'POST' | 'PUT', path: string, src: DocumentSource, query?: Record<string, string | undefined>): Promise<T> {
  let url = `/api${path}`;
  const qs = new URLSearchParams();
  for (const [k, v] of Object.entries(query ?? {})) if (v) qs.set(k, v);
  if (qs.toString()) url += `?${qs}`;
  let body: BodyInit;
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (src.kind === 'file') {
    const fd = new FormData();
    fd.append('file', src.file, src.file.name);
    body = fd;
  } else {
    body = JSON.stringify(src.document);
    headers['Content-Type'] = 'application/json';
  }
  let res: Response;
  try {
    res = await fetch(url, { method, credentials: 'include', headers, body });
  } catch {
    throw new ApiError({ status: 0, code: 'network', message: 'The server could not be reached. Check your connection and try again.' });
  }
  const text = await res.text();
  let data: unknown;
  try { data = text ? JSON.parse(text) : undefined; } catch { data = undefined; }
  if (!res.ok) throw toApiError(res.status, data, res.headers);
  return data as T;
}
