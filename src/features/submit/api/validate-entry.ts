import { useMutation } from '@tanstack/react-query';
import { sendDocument, type DocumentSource } from './send-document';

export interface ProblemItem { path: string; message: string }
export interface SweepStats { targets: number; answered: number; scored: number; gridCoverage: number | null; rmse: number | null; maxAbsError: number | null; meanZ2: number | null; fractionCovered: number | null; meanCrps: number | null; meanIntervalScore: number | null }
export interface PreviewTarget { target: string; value: number; uncertainty: number; reference: number; error: number; z: number | null; covered: boolean }
export interface ValidateResult {
  valid: true; stored: false;
  /** whether it would be stored as a draft now (before the window opens it would); the warnings say why not */
  acceptsDrafts: boolean;
  /** whether it could also be submitted for review now (state, submission window, open tracks) */
  acceptsSubmissions: boolean;
  /** the same as acceptsSubmissions, kept for compatibility */
  acceptsEntries: boolean;
  challenge: { slug: string; version: number; checksum: string };
  estimates: number;
  coverage: { targets: number; covered: number; fraction: number };
  warnings: ProblemItem[];
  scores: { exactReferences: number; sweep: { verifiable: SweepStats; unverifiable: SweepStats; gridCoverage: number | null }; targets: PreviewTarget[]; listed: string };
}

/** Dry run: validate and preview scores against the public references; stores nothing. */
export const validateEntry = (src: DocumentSource) => sendDocument<ValidateResult>('POST', '/entries/validate', src);

export const useValidateEntry = () => useMutation({ mutationFn: validateEntry });
