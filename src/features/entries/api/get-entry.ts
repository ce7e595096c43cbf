import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface NoiseScaledPoint { scale: number; value: number; uncertainty: number; shots?: number }
export interface ConvergencePoint { parameter: number; value: number; cost?: number; uncertainty?: number }
export interface EntryDocumentEstimate {
  target: string; value: number; uncertainty: number; uncertaintyKind?: string;
  unmitigated?: number; noiseScaled?: NoiseScaledPoint[]; convergence?: ConvergencePoint[];
  [k: string]: unknown;
}
export interface EntryDocument {
  challenge?: { id: string; version: number; checksum: string };
  track?: string; label?: string;
  method?: { family?: string; description?: string; settings?: Record<string, unknown> };
  resources?: { wallTimeSeconds?: number; cpuCoreHours?: number; gpuHours?: number; qpuSeconds?: number; memoryGiB?: number; qubitsUsed?: number; hardware?: string; device?: string; software?: { name: string; version?: string }[]; commit?: string };
  links?: { code?: string; preprint?: string; doi?: string };
  license?: string; notes?: string;
  estimates: EntryDocumentEstimate[];
}
export interface EntryRevision { id: string; revision: number; state: string; publishedAt: string | null; supersedesId: string | null }
export interface EntryHistoryItem { at: string; action: string; reason?: string }
/**
 * The server's score of one estimate (server/presenters/entry.ts): against the exact reference where
 * it is public (error = estimate − reference, z = error / u, covered when |error| ≤ 2u), and the
 * degree of equivalence with the consensus of the latest public standings (d, U with k = 2).
 */
export interface EstimateScore {
  target: string;
  reference: { error: number; z: number | null; covered: boolean } | null;
  consensus: { d: number; U: number; included: boolean } | null;
}
export interface Entry {
  id: string;
  challenge: { slug: string; version: number | null; checksum: string | null };
  team: { id: string; name: string | null; slug: string | null };
  state: string; track: 'hardware' | 'classical'; methodFamily: string; label: string;
  revision: number; lineageId: string | null; supersedesId: string | null; isBaseline: boolean;
  createdAt: string; updatedAt: string; submittedAt: string | null; publishedAt: string | null;
  featured: boolean;
  /** set when a moderator hid the entry (out of the standings and lists): the public reason */
  hidden: { reason: string } | null;
  estimates: number;
  coverage: { targets: number; covered: number; fraction: number };
  revisions: EntryRevision[];
  history?: EntryHistoryItem[];
  document?: EntryDocument;
  /** one per estimate of the document (sent with the document) */
  scores?: EstimateScore[];
  /** house-baseline estimates of sealed targets left out of the document until the reveal */
  withheld?: { estimates: number; reason: string; until: string | null } | null;
  /** a draft saved with problems (the team sees them): it cannot be submitted until they are fixed */
  problems?: { path: string; message: string }[];
}

export const getEntry = (entryId: string, signal?: AbortSignal) => api.get<Entry>(`/entries/${encodeURIComponent(entryId)}`, { signal });

export const entryQueryKey = (entryId: string) => ['entries', entryId] as const;
export const getEntryQueryOptions = (entryId: string) =>
  queryOptions({ queryKey: entryQueryKey(entryId), queryFn: ({ signal }) => getEntry(entryId, signal) });
export const useEntry = (entryId: string) => useQuery(getEntryQueryOptions(entryId));
