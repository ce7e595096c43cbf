/**
 * The database schema, in the product's vocabulary. Auth tables follow better-auth's model
 * (core + admin + organization + api-key plugins); a Parallax "team" is a better-auth
 * organization. Migrations are generated from this file by `npm run db:generate`.
 */
import { sql } from 'drizzle-orm';
import {
  bigserial, boolean, doublePrecision, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid,
} from 'drizzle-orm/pg-core';
import type { Track } from '@shared/vocabulary';

const ts = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });
const created = () => ts('created_at').notNull().defaultNow();

// ---------------------------------------------------------------- auth (better-auth model)
export const user = pgTable('user', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  email: text('email').notNull().unique(),
  emailVerified: boolean('email_verified').notNull().default(false),
  image: text('image'),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
  role: text('role'),
  banned: boolean('banned').default(false),
  banReason: text('ban_reason'),
  banExpires: ts('ban_expires'),
});

export const session = pgTable('session', {
  id: text('id').primaryKey(),
  expiresAt: ts('expires_at').notNull(),
  token: text('token').notNull().unique(),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
  ipAddress: text('ip_address'),
  userAgent: text('user_agent'),
  userId: text('user_id').notNull().references(() => user.id, { onDelete: 'cascade' }),
  impersonatedBy: text('impersonated_by'),
  activeOrganizationId: text('active_organization_id'),
}, (t) => [index('session_user_idx').on(t.userId)]);

export const account = pgTable('account', {
  id: text('id').primaryKey(),
  accountId: text('account_id').notNull(),
  providerId: text('provider_id').notNull(),
  userId: text('user_id').notNull().references(() => user.id, { onDelete: 'cascade' }),
  accessToken: text('access_token'),
  refreshToken: text('refresh_token'),
  idToken: text('id_token'),
  accessTokenExpiresAt: ts('access_token_expires_at'),
  refreshTokenExpiresAt: ts('refresh_token_expires_at'),
  scope: text('scope'),
  password: text('password'),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
}, (t) => [index('account_user_idx').on(t.userId)]);

export const verification = pgTable('verification', {
  id: text('id').primaryKey(),
  identifier: text('identifier').notNull(),
  value: text('value').notNull(),
  expiresAt: ts('expires_at').notNull(),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
}, (t) => [index('verification_identifier_idx').on(t.identifier)]);

export const organization = pgTable('organization', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  slug: text('slug').notNull().unique(),
  logo: text('logo'),
  createdAt: created(),
  metadata: text('metadata'),
});

export const member = pgTable('member', {
  id: text('id').primaryKey(),
  organizationId: text('organization_id').notNull().references(() => organization.id, { onDelete: 'cascade' }),
  userId: text('user_id').notNull().references(() => user.id, { onDelete: 'cascade' }),
  role: text('role').notNull().default('member'),
  createdAt: created(),
}, (t) => [index('member_org_idx').on(t.organizationId), index('member_user_idx').on(t.userId)]);

export const invitation = pgTable('invitation', {
  id: text('id').primaryKey(),
  organizationId: text('organization_id').notNull().references(() => organization.id, { onDelete: 'cascade' }),
  email: text('email').notNull(),
  role: text('role'),
  status: text('status').notNull().default('pending'),
  expiresAt: ts('expires_at').notNull(),
  inviterId: text('inviter_id').notNull().references(() => user.id, { onDelete: 'cascade' }),
  createdAt: created(),
}, (t) => [index('invitation_org_idx').on(t.organizationId), index('invitation_email_idx').on(t.email)]);

export const apikey = pgTable('apikey', {
  id: text('id').primaryKey(),
  configId: text('config_id').notNull().default('default'),
  name: text('name'),
  start: text('start'),
  referenceId: text('reference_id').notNull(),
  prefix: text('prefix'),
  key: text('key').notNull(),
  refillInterval: integer('refill_interval'),
  refillAmount: integer('refill_amount'),
  lastRefillAt: ts('last_refill_at'),
  enabled: boolean('enabled').default(true),
  rateLimitEnabled: boolean('rate_limit_enabled').default(true),
  rateLimitTimeWindow: integer('rate_limit_time_window'),
  rateLimitMax: integer('rate_limit_max'),
  requestCount: integer('request_count').default(0),
  remaining: integer('remaining'),
  lastRequest: ts('last_request'),
  expiresAt: ts('expires_at'),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
  permissions: text('permissions'),
  metadata: text('metadata'),
  /** the user who made the key (POST /api/teams/:teamId/api-keys): a ban of that user revokes it */
  createdBy: text('created_by').references(() => user.id, { onDelete: 'cascade' }),
}, (t) => [index('apikey_created_by_idx').on(t.createdBy), index('apikey_key_idx').on(t.key), index('apikey_reference_idx').on(t.referenceId), index('apikey_config_idx').on(t.configId)]);

// ---------------------------------------------------------------- challenges
/** A challenge family (the slug); its content lives in versions. */
export const challenges = pgTable('challenges', {
  slug: text('slug').primaryKey(),
  title: text('title').notNull(),
  summary: text('summary').notNull().default(''),
  /** draft: no published version yet; open: accepting entries; closed: read-only */
  state: text('state').notNull().default('draft'),
  currentVersionId: uuid('current_version_id'),
  /** moderator settings: estimator, primaryMetric, tracks, window, license */
  settings: jsonb('settings').notNull().default(sql`'{}'::jsonb`),
  createdBy: text('created_by'),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
});

/** One immutable version of a challenge spec with its checksum. */
export const challengeVersions = pgTable('challenge_versions', {
  id: uuid('id').primaryKey().defaultRandom(),
  challengeSlug: text('challenge_slug').notNull().references(() => challenges.slug, { onDelete: 'cascade' }),
  version: integer('version').notNull(),
  checksum: text('checksum').notNull(),
  spec: jsonb('spec').notNull(),
  /** draft | published | superseded */
  state: text('state').notNull().default('draft'),
  supersededReason: text('superseded_reason'),
  publishedAt: ts('published_at'),
  createdAt: created(),
}, (t) => [uniqueIndex('challenge_version_uq').on(t.challengeSlug, t.version), uniqueIndex('challenge_checksum_uq').on(t.checksum)]);

export const instances = pgTable('instances', {
  id: uuid('id').primaryKey().defaultRandom(),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  key: text('key').notNull(),
  params: jsonb('params').notNull(),
  qubits: integer('qubits').notNull(),
  gateCount: integer('gate_count').notNull(),
  depth: integer('depth').notNull(),
}, (t) => [uniqueIndex('instance_key_uq').on(t.versionId, t.key)]);

export const observables = pgTable('observables', {
  id: uuid('id').primaryKey().defaultRandom(),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  key: text('key').notNull(),
  spec: jsonb('spec').notNull(),
  /** sum of |coef|: the physical bound on |<O>| */
  bound: doublePrecision('bound').notNull(),
}, (t) => [uniqueIndex('observable_key_uq').on(t.versionId, t.key)]);

export const targets = pgTable('targets', {
  id: uuid('id').primaryKey().defaultRandom(),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  key: text('key').notNull(),
  instanceId: uuid('instance_id').notNull().references(() => instances.id, { onDelete: 'cascade' }),
  observableId: uuid('observable_id').notNull().references(() => observables.id, { onDelete: 'cascade' }),
  disputed: boolean('disputed').notNull().default(false),
  disputeNote: text('dispute_note'),
}, (t) => [uniqueIndex('target_key_uq').on(t.versionId, t.key)]);

/** The exact value of a target with its provenance; sealed until a date for blind rounds. */
export const references = pgTable('references', {
  id: uuid('id').primaryKey().defaultRandom(),
  targetId: uuid('target_id').notNull().references(() => targets.id, { onDelete: 'cascade' }),
  value: doublePrecision('value'),
  uncertainty: doublePrecision('uncertainty').notNull().default(0),
  /** pauli-propagation | light-cone-statevector | free-fermion | statevector | supplied | none */
  method: text('method').notNull(),
  /** what mattered for the cost: terms, light-cone qubits, ... */
  size: jsonb('size').notNull().default(sql`'{}'::jsonb`),
  wallMs: doublePrecision('wall_ms'),
  engineVersion: text('engine_version'),
  /** why no exact value exists, when value is null */
  reason: text('reason'),
  suppliedBy: text('supplied_by'),
  sealedUntil: ts('sealed_until'),
  createdAt: created(),
}, (t) => [uniqueIndex('reference_target_uq').on(t.targetId)]);

// ---------------------------------------------------------------- entries
export const entries = pgTable('entries', {
  id: uuid('id').primaryKey().defaultRandom(),
  challengeSlug: text('challenge_slug').notNull().references(() => challenges.slug),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id),
  teamId: text('team_id').notNull().references(() => organization.id),
  createdBy: text('created_by'),
  /** draft | in-review | published | returned | rejected | withdrawn | superseded */
  state: text('state').notNull().default('draft'),
  /** hardware | classical */
  track: text('track').$type<Track>().notNull(),
  methodFamily: text('method_family').notNull(),
  label: text('label').notNull(),
  /** the submitted document's metadata (settings, resources, links, licence) */
  document: jsonb('document').notNull(),
  revision: integer('revision').notNull().default(1),
  /** the first entry of the revision chain */
  lineageId: uuid('lineage_id'),
  supersedesId: uuid('supersedes_id'),
  isBaseline: boolean('is_baseline').notNull().default(false),
  featured: boolean('featured').notNull().default(false),
  hiddenReason: text('hidden_reason'),
  createdAt: created(),
  updatedAt: ts('updated_at').notNull().defaultNow(),
  submittedAt: ts('submitted_at'),
  publishedAt: ts('published_at'),
  /**
   * A draft saved with problems (POST/PUT ?incomplete=1): the problems the validation found, and
   * the document as sent in `document` (estimates included, none in the estimates table). Null
   * for a valid entry. A draft with problems cannot be submitted.
   */
  problems: jsonb('problems'),
  /** the Idempotency-Key header of the request that created it (unique per team) */
  idempotencyKey: text('idempotency_key'),
  /** SHA-256 of the request body sent with that key: the same key with another body is refused */
  idempotencyHash: text('idempotency_hash'),
}, (t) => [index('entries_challenge_idx').on(t.challengeSlug, t.state), index('entries_team_idx').on(t.teamId), uniqueIndex('entries_idempotency_uq').on(t.teamId, t.idempotencyKey)]);

export const estimates = pgTable('estimates', {
  id: bigserial('id', { mode: 'number' }).primaryKey(),
  /**
   * the entry; kept by statement-level triggers instead of a foreign key (migration 0009): a
   * foreign key checks each of an entry's up to 100,000 rows one by one, about 1 s of the 2.3 s that
   * storing such an entry took on PGlite. The triggers check every inserted or updated row's entry
   * in one query per statement (locking the entries as a foreign key would, FOR KEY SHARE) and
   * delete an entry's estimates with the entry, cascades included.
   */
  entryId: uuid('entry_id').notNull(),
  targetKey: text('target_key').notNull(),
  value: doublePrecision('value').notNull(),
  uncertainty: doublePrecision('uncertainty').notNull(),
  /** statistical | systematic | bound | none */
  kind: text('kind').notNull(),
  /** optional raw data: unmitigated value, per-noise-factor values, convergence trace */
  raw: jsonb('raw'),
  // one estimate per target is guaranteed by validation; a unique index here tripled the cost of
  // storing a 100,000-estimate entry (bench/entries.bench.ts), so a plain index serves the lookups
}, (t) => [index('estimates_entry_idx').on(t.entryId)]);

export const reviews = pgTable('reviews', {
  id: uuid('id').primaryKey().defaultRandom(),
  entryId: uuid('entry_id').notNull().references(() => entries.id, { onDelete: 'cascade' }),
  moderatorId: text('moderator_id'),
  decision: text('decision').notNull(),
  reason: text('reason').notNull(),
  fromState: text('from_state').notNull(),
  toState: text('to_state').notNull(),
  createdAt: created(),
}, (t) => [index('reviews_entry_idx').on(t.entryId)]);

/** Append-only: a trigger in the migration forbids UPDATE and DELETE. */
export const auditLog = pgTable('audit_log', {
  id: bigserial('id', { mode: 'number' }).primaryKey(),
  at: ts('at').notNull().defaultNow(),
  actorId: text('actor_id'),
  actorLabel: text('actor_label').notNull(),
  action: text('action').notNull(),
  subjectType: text('subject_type').notNull(),
  subjectId: text('subject_id').notNull(),
  details: jsonb('details').notNull().default(sql`'{}'::jsonb`),
}, (t) => [index('audit_subject_idx').on(t.subjectType, t.subjectId)]);

/** Background work (reference computation, standings). Claimed with FOR UPDATE SKIP LOCKED. */
export const jobs = pgTable('jobs', {
  id: uuid('id').primaryKey().defaultRandom(),
  kind: text('kind').notNull(),
  payload: jsonb('payload').notNull(),
  /** queued | running | done | failed */
  state: text('state').notNull().default('queued'),
  progress: doublePrecision('progress').notNull().default(0),
  progressNote: text('progress_note'),
  attempts: integer('attempts').notNull().default(0),
  /** the public message of a failed job (never the raw exception: server/jobs/queue.ts failJob) */
  error: text('error'),
  /** the raw exception of a failed job, for the log and admins only; no public route reads it */
  errorDetail: text('error_detail'),
  result: jsonb('result'),
  lockedBy: text('locked_by'),
  lockedAt: ts('locked_at'),
  createdAt: created(),
  startedAt: ts('started_at'),
  finishedAt: ts('finished_at'),
}, (t) => [index('jobs_state_idx').on(t.state, t.createdAt)]);

/**
 * A target whose tensor-network reference is computed as slice jobs (issue 15): the reference job
 * that handed it out, its terms with their plans (server/jobs/tn-slices-job.ts encodes them), how
 * many slice jobs make it, and what the reference will record. Written once per (job, target).
 */
export const tnSliceRuns = pgTable('tn_slice_runs', {
  id: uuid('id').primaryKey().defaultRandom(),
  parentJobId: uuid('parent_job_id').notNull().references(() => jobs.id, { onDelete: 'cascade' }),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  targetKey: text('target_key').notNull(),
  terms: jsonb('terms').notNull(),
  parts: integer('parts').notNull(),
  /** method, size, detail, width, flops, slices, engine version of the reference to write */
  template: jsonb('template').notNull(),
  /** pending | combined */
  state: text('state').notNull().default('pending'),
  createdAt: created(),
  combinedAt: ts('combined_at'),
}, (t) => [uniqueIndex('tn_slice_runs_job_target').on(t.parentJobId, t.targetKey)]);

/** The partial sums of one slice job: one [re, im] per slice block, in block order; one row per (run, term, slice range). */
export const tnSliceParts = pgTable('tn_slice_parts', {
  runId: uuid('run_id').notNull().references(() => tnSliceRuns.id, { onDelete: 'cascade' }),
  term: integer('term').notNull(),
  sliceStart: integer('slice_start').notNull(),
  sliceEnd: integer('slice_end').notNull(),
  partials: jsonb('partials').notNull(),
  wallMs: doublePrecision('wall_ms').notNull(),
  createdAt: created(),
}, (t) => [uniqueIndex('tn_slice_parts_range').on(t.runId, t.term, t.sliceStart, t.sliceEnd)]);

/** Cached standings per challenge version (recomputed off the request path). */
export const standings = pgTable('standings', {
  id: uuid('id').primaryKey().defaultRandom(),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  computedAt: ts('computed_at').notNull().defaultNow(),
  engineVersion: text('engine_version').notNull(),
  /** SCORING_RULES_VERSION the row was computed under (rows from before the column: '2026-11.0') */
  scoringRulesVersion: text('scoring_rules_version').notNull().default('2026-11.0'),
  payload: jsonb('payload').notNull(),
}, (t) => [index('standings_version_idx').on(t.versionId, t.computedAt)]);

/** Messages received by the in-process fake SMTP server (the outbox page reads them). */
export const mailMessages = pgTable('mail_messages', {
  id: uuid('id').primaryKey().defaultRandom(),
  receivedAt: ts('received_at').notNull().defaultNow(),
  from: text('from').notNull(),
  to: text('to').notNull(),
  subject: text('subject').notNull(),
  text: text('text').notNull(),
  html: text('html'),
}, (t) => [index('mail_to_idx').on(t.to)]);

// ---------------------------------------------------------------- moderation: blind rounds
/**
 * A moderator's seal of reference values until a date (a blind round). Applied to existing
 * reference rows at once (references.sealed_until), and to rows the reference job writes later by
 * the trigger references_apply_seal (migration 0003): a value is never stored unsealed. The
 * reveal job sets revealed_at once the date has passed.
 */
export const referenceSeals = pgTable('reference_seals', {
  id: uuid('id').primaryKey().defaultRandom(),
  versionId: uuid('version_id').notNull().references(() => challengeVersions.id, { onDelete: 'cascade' }),
  challengeSlug: text('challenge_slug').notNull(),
  /** true: every target of the version; false: the keys in target_keys */
  allTargets: boolean('all_targets').notNull().default(false),
  targetKeys: jsonb('target_keys').notNull().default(sql`'[]'::jsonb`),
  sealedUntil: ts('sealed_until').notNull(),
  createdBy: text('created_by'),
  createdAt: created(),
  revealedAt: ts('revealed_at'),
}, (t) => [index('reference_seals_version_idx').on(t.versionId), index('reference_seals_due_idx').on(t.revealedAt, t.sealedUntil)]);

/**
 * A team's commitment to an entry's estimates before a reveal: the SHA-256 of the canonical string
 * of server/services/register-commitment.ts (commitmentString). Checked at the reveal.
 */
export const entryCommitments = pgTable('entry_commitments', {
  entryId: uuid('entry_id').primaryKey().references(() => entries.id, { onDelete: 'cascade' }),
  sha256: text('sha256').notNull(),
  registeredAt: ts('registered_at').notNull(),
  registeredBy: text('registered_by').notNull(),
  /** pending | match | mismatch */
  result: text('result').notNull().default('pending'),
  /** the hash of the entry's estimates as the reveal found them */
  computedSha256: text('computed_sha256'),
  checkedAt: ts('checked_at'),
});

// ---------------------------------------------------------------- abuse limits (issue 12)
/**
 * Failed sign-ins per (account, client address) and per address, shared by every server process
 * (server/middleware/sign-in-throttle.ts). blocked_until grows with each failure past the free ones.
 */
export const signInFailures = pgTable('sign_in_failures', {
  key: text('key').primaryKey(),
  failures: integer('failures').notNull().default(0),
  lastFailureAt: ts('last_failure_at').notNull(),
  blockedUntil: ts('blocked_until'),
});

/**
 * Mail that a user makes the server send to someone else (team invitations), on the injected
 * clock: the per-sender and per-recipient limits of server/services/team-rules.ts count these rows.
 */
export const mailQuota = pgTable('mail_quota', {
  id: bigserial('id', { mode: 'number' }).primaryKey(),
  kind: text('kind').notNull(),
  senderId: text('sender_id').notNull(),
  recipient: text('recipient').notNull(),
  at: ts('at').notNull(),
}, (t) => [index('mail_quota_sender_idx').on(t.kind, t.senderId, t.at), index('mail_quota_recipient_idx').on(t.kind, t.recipient, t.at)]);

// ---------------------------------------------------------------- follows
/**
 * A signed-in user following a challenge (subject_id = slug) or a team (subject_id = team id):
 * e-mail when an entry is published, a reference is revealed or computed, or the standings are
 * rescored. The token signs the one-click unfollow link in every message.
 */
export const follows = pgTable('follows', {
  id: uuid('id').primaryKey().defaultRandom(),
  userId: text('user_id').notNull().references(() => user.id, { onDelete: 'cascade' }),
  /** challenge | team */
  subjectType: text('subject_type').notNull(),
  subjectId: text('subject_id').notNull(),
  token: text('token').notNull().unique(),
  createdAt: created(),
}, (t) => [uniqueIndex('follows_user_subject_uq').on(t.userId, t.subjectType, t.subjectId), index('follows_subject_idx').on(t.subjectType, t.subjectId)]);
