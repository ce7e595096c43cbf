/**
 * The entry-document routes take the document as a raw JSON body or as the multipart field
 * "file" (server/routes/entries.ts): one helper sends either with POST or PUT through the shared
 * api client, so every form sees one error model (ApiError with problems).
 */
import { api, fileForm } from '@/lib/api-client';
import type { EntryDocument } from '@/features/entries/api/get-entry';

export type DocumentSource = { kind: 'json'; document: EntryDocument } | { kind: 'file'; file: File };

export function sendDocument<T>(method: 'POST' | 'PUT', path: string, src: DocumentSource, query?: Record<string, string | undefined>): Promise<T> {
  const body = src.kind === 'file' ? fileForm(src.file) : src.document;
  return method === 'POST' ? api.post<T>(path, body, { query }) : api.put<T>(path, body, { query });
}
