/** The entry format as the server reads it, and the limits of a check (schemas/entry.schema.json is the source). */
import type { FieldProblem } from '../../errors';
import { DEFAULT_MAX_DEPTH } from '../../util/strict-json';

export const MAX_ESTIMATES = 100_000;
/** problems listed in one answer; the rest are counted ("... and N more") */
export const MAX_PROBLEMS = 50;
export const MAX_DEPTH = DEFAULT_MAX_DEPTH;

export type UncertaintyKind = 'statistical' | 'systematic' | 'bound' | 'none';
export interface EntryEstimate {
  target: string;
  value: number;
  uncertainty: number;
  uncertaintyKind: UncertaintyKind;
  unmitigated?: number;
  noiseScaled?: { scale: number; value: number; uncertainty: number; shots?: number }[];
  convergence?: { parameter: number; value: number; cost?: number }[];
}
export interface EntryDocument {
  $schema?: string;
  challenge: { id: string; version: number; checksum: string };
  track: 'hardware' | 'classical';
  label: string;
  method: { family: string; description?: string; settings?: Record<string, unknown> };
  resources?: Record<string, unknown>;
  links?: Record<string, string>;
  license?: string;
  notes?: string;
  estimates: EntryEstimate[];
}

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
