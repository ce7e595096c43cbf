/**
 * The vocabulary of Parallax's two formats, named for the code: tracks, method families,
 * uncertainty kinds, lattice kinds, circuit families, gate names and the limits a document may reach.
 * Every value comes from schemas/entry.schema.json and schemas/challenge.schema.json (through
 * shared/schema.generated.ts, written by `npm run schema:types`), so a list or limit changes in the
 * schema and nowhere else. Server, client, document threads and tests import it from here.
 */
import { CHALLENGE_ENUMS, CHALLENGE_LIMITS, ENTRY_ENUMS, ENTRY_LIMITS } from './schema.generated';

export type { EntryDocumentJson, EntryEstimate as EntryEstimateJson, EntrySettingValue, ChallengeSpecJson } from './schema.generated';

// ------------------------------------------------------------------ lists

/** The two tracks an entry (and a team) competes in: quantum hardware, classical simulation. */
export const TRACKS = ENTRY_ENUMS.track;
export type Track = (typeof TRACKS)[number];
/** A standings view: one track or both. */
export const TRACK_VIEWS = ['all', ...TRACKS] as const;
export type TrackView = (typeof TRACK_VIEWS)[number];
export const isTrack = (v: unknown): v is Track => (TRACKS as readonly unknown[]).includes(v);

/** The method families an entry declares (method.family). */
export const METHOD_FAMILIES = ENTRY_ENUMS['method.family'];
export type MethodFamily = (typeof METHOD_FAMILIES)[number];
export const isMethodFamily = (v: unknown): v is MethodFamily => (METHOD_FAMILIES as readonly unknown[]).includes(v);

/** What an estimate's uncertainty is (estimates[].uncertaintyKind). */
export const UNCERTAINTY_KINDS = ENTRY_ENUMS['$estimate.uncertaintyKind'];
export type UncertaintyKind = (typeof UNCERTAINTY_KINDS)[number];
export const isUncertaintyKind = (v: unknown): v is UncertaintyKind => (UNCERTAINTY_KINDS as readonly unknown[]).includes(v);

export const LATTICE_KINDS = CHALLENGE_ENUMS['$lattice.kind'];
export type LatticeKind = (typeof LATTICE_KINDS)[number];
export const CIRCUIT_FAMILIES = CHALLENGE_ENUMS['$circuit.family'];
export type CircuitFamily = (typeof CIRCUIT_FAMILIES)[number];
export const GATE_NAMES = CHALLENGE_ENUMS['$gate.name'];
export type SchemaGateName = (typeof GATE_NAMES)[number];

// ------------------------------------------------------------------ limits

/** The entry format's limits the code states (in messages, form fields, request checks). */
export const ENTRY_FORMAT_LIMITS = {
  /** estimates per entry */
  estimates: ENTRY_LIMITS.estimates.maxItems,
  label: ENTRY_LIMITS.label.maxLength,
  description: ENTRY_LIMITS['method.description'].maxLength,
  settings: ENTRY_LIMITS['method.settings'].maxProperties,
  notes: ENTRY_LIMITS.notes.maxLength,
  license: ENTRY_LIMITS.license.maxLength,
  /** a target key, '<instance id>:<observable id>' */
  targetKey: ENTRY_LIMITS['$estimate.target'].maxLength,
  /** points of a zero-noise extrapolation (noiseScaled) */
  noiseScalePoints: ENTRY_LIMITS['$estimate.noiseScaled'].maxItems,
  noiseScale: { min: ENTRY_LIMITS['$estimate.noiseScaled[].scale'].minimum, max: ENTRY_LIMITS['$estimate.noiseScaled[].scale'].maximum },
  convergencePoints: ENTRY_LIMITS['$estimate.convergence'].maxItems,
  /** |value| of any number in an entry */
  magnitude: ENTRY_LIMITS.$finite.maximum,
} as const;
/** estimates per entry (schemas/entry.schema.json, estimates.maxItems) */
export const MAX_ESTIMATES = ENTRY_FORMAT_LIMITS.estimates;

/** The challenge format's limits the code states. */
export const CHALLENGE_FORMAT_LIMITS = {
  qubits: CHALLENGE_LIMITS.$qubitCount.maximum,
  observables: CHALLENGE_LIMITS.observables.maxItems,
  pauliLength: CHALLENGE_LIMITS.$pauli.maxLength,
  termsPerObservable: CHALLENGE_LIMITS['$observable.terms'].maxItems,
} as const;
