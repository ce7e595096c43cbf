/**
 * The JSON the public API answers with, as one set of types: the server's presenters annotate their
 * results with them and the client's API modules read them (src/features/<feature>/api). Times are
 * `Date` where the server holds them; `Wire<T>` is what the client receives after JSON.stringify
 * (a Date becomes its ISO string, an undefined field is left out).
 */
import type { EntryDocumentJson, EntryEstimateJson, LatticeKind, Track, TrackView, UncertaintyKind } from './vocabulary';
import type { ChallengeSpec } from './physics/challenge-spec';
import type { ObservableJson } from './physics/observable';
import type { PrimaryMetric, StandingsResult, StandingsRow } from './scoring/standings';

export type { ChallengeSpec, ObservableJson, Track, TrackView, UncertaintyKind };

/** T as JSON.stringify writes it and the client parses it back. */
export type Wire<T> =
  T extends Date ? string
  // a mapped type keeps arrays, tuples and readonly as they are
  : T extends object ? { [K in keyof T]: Wire<T[K]> }
  : T;

// ------------------------------------------------------------------ documents

/** An entry document (schemas/entry.schema.json, through shared/schema.generated.ts). */
export type EntryDocument = EntryDocumentJson;
/** One estimate of an entry document. */
export type EntryEstimate = EntryEstimateJson;

// ------------------------------------------------------------------ references

/** What mattered for a reference's cost, as the engine recorded it (shared/physics/reference.ts). */
export interface ReferenceSize {
  sites?: number; qubits?: number; terms?: number; width?: number; flops?: number; slices?: number;
  detail?: string;
  crossCheck?: { method: string; value: number; absDiff: number; wallMs: number };
  [k: string]: unknown;
}
/** A target's exact reference as a caller sees it (server/presenters/reference.ts): sealed values withheld until their date. */
export type ReferenceView =
  | { status: 'pending' }
  | { status: 'sealed'; sealedUntil: Date | null }
  | { status: 'none'; reason: string | null; engineVersion: string | null }
  | {
    status: 'exact'; value: number; uncertainty: number; method: string; size: ReferenceSize; wallMs: number | null; engineVersion: string | null; createdAt: Date;
    /** set for a caller who may see a sealed value: the date until which the public does not */
    sealedUntil?: Date | null;
  };

// ------------------------------------------------------------------ entries

export interface EntryCoverage { targets: number; covered: number; fraction: number }
/** The fields every view of an entry shares, pages and lists (server/presenters/entry.ts entrySummary). */
export interface EntrySummary {
  id: string;
  challenge: { slug: string; version: number | null; checksum: string | null };
  team: { id: string; name: string | null; slug: string | null };
  state: string; track: Track; methodFamily: string; label: string; featured: boolean;
  revision: number; lineageId: string | null; supersedesId: string | null; isBaseline: boolean;
  createdAt: Date; updatedAt: Date; submittedAt: Date | null; publishedAt: Date | null;
  /** set when a moderator hid the entry: the public reason; it is out of the standings and lists */
  hidden: { reason: string } | null;
  /** estimates stored */
  estimates: number;
  coverage: EntryCoverage;
}
/**
 * The server's score of one estimate: against the exact reference where the caller may see it
 * (error = estimate - reference, z = error / u, covered when |error| <= 2u, CRPS), and the degree
 * of equivalence with the consensus of the latest public standings (d, U with k = 2).
 */
export interface EstimateScore {
  target: string;
  reference: { error: number; z: number | null; covered: boolean; crps: number | null } | null;
  consensus: { d: number; U: number; included: boolean; score: number } | null;
}
export interface EntryRevision { id: string; revision: number; state: string; publishedAt: Date | null; supersedesId: string | null }
export interface EntryHistoryItem { at: Date; action: string; actor?: string | null; reason?: string; warnings?: unknown }
/** GET /api/entries/:id (server/presenters/entry.ts presentEntry). */
export interface EntryPage extends EntrySummary {
  revisions: EntryRevision[];
  history: EntryHistoryItem[];
  /** the document as submitted, without the estimates the caller may not see (sent when asked) */
  document?: EntryDocument;
  /** house-baseline estimates of sealed targets left out of the document until the reveal */
  withheld: { estimates: number; reason: string; until: string | null } | null;
  /** a draft saved with problems (the team sees them): it cannot be submitted until they are fixed */
  problems?: { path: string; message: string }[];
  /** one per estimate of the document (sent with the document) */
  scores?: EstimateScore[];
  /** the scoring rules the scores follow (shared/scoring/rules.ts) */
  scoringRulesVersion?: string;
}

// ------------------------------------------------------------------ standings

/** One row of the standings as the API sends it: the stored row with its rank under the asked metric and track. */
export type StandingsRowView = StandingsRow;
/** GET /api/challenges/:slug/standings (server/routes/standings.ts). */
export interface StandingsResponse {
  challenge: string; version: number; checksum: string;
  status: 'ready' | 'pending' | 'rescoring' | 'none';
  computedAt: Date | null; engineVersion: string | null;
  scoringRulesVersion: string | null; currentScoringRulesVersion: string; rulesPage: string;
  exactTolerance: number; minIndependentTeams: number; bootstrapReplicates: number | null;
  nearCopies: StandingsResult['nearCopies'];
  estimator: string | null; metric: PrimaryMetric; metrics: readonly PrimaryMetric[]; track: TrackView; view: 'public' | 'private'; asOf: Date | null;
  counts: StandingsResult['counts'] | null;
  entries: StandingsRowView[];
}

// ------------------------------------------------------------------ challenges and targets

/** The parameters of one instance of the grid (kicked-ising: steps, thetaH, thetaJ). */
export type InstanceParams = { family?: string; steps?: number; thetaH?: number; thetaJ?: number } & Record<string, unknown>;
export interface ChallengeVersionInfo { version: number; checksum: string; state: string; publishedAt: Date | null; supersededReason: string | null }
export interface ChallengeJob { id: string; kind: string; state: string; progress: number | null; note: string | null; error: string | null; createdAt: Date; finishedAt: Date | null }
export interface ChallengeInstance { key: string; params: InstanceParams; qubits: number; gateCount: number; depth: number }
export interface ChallengeObservable { key: string; spec: ObservableJson; bound: number | null }
/** The moderators' settings of a challenge (all optional: defaults apply). */
export interface ChallengeSettings { estimator?: string; primaryMetric?: string; tracks?: string[]; license?: string; state?: string; submissionWindow?: { opensAt?: string | null; closesAt?: string | null } | null }
/**
 * Whether the challenge takes entries now, on the server's clock (asOf): the same answer as the
 * enforcement. acceptsEntriesNow: a submission would be taken now; acceptsDraftsNow: a new draft
 * would be stored now. Drafts already saved stay editable whatever it says.
 */
export interface SubmissionsStatus {
  acceptsEntriesNow: boolean;
  acceptsDraftsNow: boolean;
  /** short, when it takes no submission: "submissions closed", "opens 2026-12-24 00:00 UTC", "no track open" */
  reason: string | null;
  openTracks: Track[];
  window: { opensAt: string | null; closesAt: string | null };
  tracks: Record<Track, { acceptsEntriesNow: boolean; acceptsDraftsNow: boolean; reason: string | null }>;
  asOf: string;
}
/** GET /api/challenges/:slug (server/routes/challenges.ts). */
export interface ChallengeDetail {
  slug: string; title: string; description: string; state: string;
  settings: ChallengeSettings;
  submissions: SubmissionsStatus;
  version: ChallengeVersionInfo & { id: string };
  versions: ChallengeVersionInfo[];
  spec: ChallengeSpec;
  lattice: { kind: LatticeKind; qubits: number; edges: readonly (readonly [number, number])[]; coords: readonly (readonly [number, number])[] };
  instances: ChallengeInstance[];
  observables: ChallengeObservable[];
  jobs: ChallengeJob[];
}

export interface ZneFit { model: string; ok: boolean; value: number | null; uncertainty: number | null; reason: string | null; chi2: number | null; nu: number | null }
/** One public estimate of a target, with its degree of equivalence and the server's zero-noise fits. */
export interface TargetEstimate {
  entry: { id: string; label: string; teamId: string; teamName: string; track: Track; methodFamily: string; isBaseline: boolean; publishedAt: Date | null };
  value: number; uncertainty: number; kind: string;
  /** against the exact reference (u^2 = u_i^2 + u_ref^2) or the consensus; U = 2u */
  equivalence: { against: 'reference' | 'consensus'; d: number; u: number; U: number; included: boolean } | null;
  zne: { points: { scale: number; value: number; uncertainty: number }[]; unmitigated: number | null; fits: ZneFit[] } | null;
}
export interface TargetConsensusDetail {
  estimator: string; entries: number; includedCount: number; excluded: string[];
  value: number | null; uncertainty: number | null; chi2: number | null; nu: number | null; p: number | null; birgeRatio: number | null; tau2: number | null; I2: number | null;
  disputed: boolean; computedAt: Date; engineVersion: string;
}
/** GET /api/challenges/:slug/targets/:key (server/routes/public-data.ts). */
export interface TargetDetail {
  version: number; checksum: string; engineVersion: string;
  key: string; instance: string; params: InstanceParams;
  observable: ChallengeObservable;
  disputed: boolean; disputeNote: string | null;
  reference: ReferenceView;
  consensus: TargetConsensusDetail | null;
  estimates: TargetEstimate[];
  siblings: { key: string; steps: number | null; thetaH: number | null }[];
}
