/** The entry format as the server reads it, and the limits of a check (schemas/entry.schema.json is the source). */
import type { FieldProblem } from '../../errors';
import { DEFAULT_MAX_DEPTH } from '../../util/strict-json';
import { MAX_ESTIMATES } from '@shared/vocabulary';
import type { EntryDocument, EntryEstimate, UncertaintyKind } from '@shared/api-types';

export { MAX_ESTIMATES, type EntryDocument, type EntryEstimate, type UncertaintyKind };
/** problems listed in one answer; the rest are counted ("... and N more") */
export const MAX_PROBLEMS = 50;
export const MAX_DEPTH = DEFAULT_MAX_DEPTH;


/** A list of problems cut at MAX_PROBLEMS, with how many there were in all. */
export interface Problems { problems: FieldProblem[]; total: number }

/** The targets of a published challenge version, as the checks need them. */
export interface VersionTargets {
  versionId: string;
  slug: string;
  version: number;
  checksum: string;
  /** target key -> [bound, observable key] */
  targets: Map<string, { bound: number; observable: string }>;
}
