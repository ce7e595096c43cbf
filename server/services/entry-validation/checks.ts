/**
 * The checks of a parsed entry document against its challenge version that need no database:
 * target ids, duplicates, physical bounds (+/- 3 sigma rule), coverage and the track/method
 * warnings. They run on the parts well-formed enough for them (estimates that are objects with a
 * string target; values and uncertainties that are finite numbers) and never assume more, so a
 * schema problem in one estimate does not hide an unknown target in another. Linear in the number
 * of estimates; at most MAX_PROBLEMS problems are described, the rest counted.
 */
import type { FieldProblem } from '../../errors';
import { MAX_ESTIMATES, MAX_PROBLEMS, type Problems, type VersionTargets } from './types';

export const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);
const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const CHALLENGE_ID = /^[a-z0-9][a-z0-9-]*$/;
const CHECKSUM = /^(sha256:)?[0-9a-f]{64}$/;
const fmt = (x: number) => String(Number(x.toPrecision(6)));

/**
 * The challenge reference of a document that may have failed the schema, as far as it is
 * well-formed enough to look up: an id in the schema's shape, then (optionally) a well-formed
 * checksum and an integer version. Whatever is malformed the schema problems already name.
 */
export interface ChallengeRef { id: string; checksum?: string; version?: number }
export function challengeRef(doc: unknown): ChallengeRef | undefined {
  if (!isObject(doc) || !isObject(doc.challenge)) return undefined;
  const { id, checksum, version } = doc.challenge;
  if (typeof id !== 'string' || id.length > 80 || !CHALLENGE_ID.test(id)) return undefined;
  return {
    id,
    checksum: typeof checksum === 'string' && CHECKSUM.test(checksum) ? checksum : undefined,
    version: typeof version === 'number' && Number.isInteger(version) ? version : undefined,
  };
}

/** What the main thread needs to know of a parsed document before it looks anything up. */
export interface DocumentSummary {
  ref?: ChallengeRef;
  track: unknown;
  family: unknown;
  estimates: number;
}
export function summarize(doc: unknown): DocumentSummary {
  const o = isObject(doc) ? doc : {};
  const ests = o.estimates;
  return { ref: challengeRef(doc), track: o.track, family: isObject(o.method) ? o.method.family : undefined, estimates: Array.isArray(ests) ? ests.length : 0 };
}

function suggestTarget(given: string, vt: VersionTargets): string {
  const [inst, obs] = given.split(':');
  let best = '';
  let bestScore = -1;
  for (const key of vt.targets.keys()) {
    const [ki, ko] = key.split(':');
    let s = 0;
    while (s < ki.length && s < (inst ?? '').length && ki[s] === inst[s]) s++;
    const score = s + (ko === obs ? 1000 : 0);
    if (score > bestScore) { bestScore = score; best = key; }
  }
  return best;
}

export interface EstimateChecks extends Problems {
  warnings: FieldProblem[];
  /** distinct targets covered */
  covered: number;
}

/** Target ids, duplicates and bounds of every estimate against the version's targets. */
export function checkEstimates(doc: unknown, vt: VersionTargets, limit = MAX_PROBLEMS): EstimateChecks {
  const problems: FieldProblem[] = [];
  const warnings: FieldProblem[] = [];
  let total = 0;
  const add = (p: () => FieldProblem) => { total++; if (problems.length < limit) problems.push(p()); };
  const seen = new Map<string, number>();
  const raw = isObject(doc) ? doc.estimates : undefined;
  // an over-long list is one problem (the schema's), not one per estimate
  const ests: unknown[] = Array.isArray(raw) && raw.length <= MAX_ESTIMATES ? raw : [];
  for (let k = 0; k < ests.length; k++) {
    const e = ests[k];
    if (!isObject(e) || typeof e.target !== 'string' || e.target.length > 200) continue;
    const key = e.target;
    const t = vt.targets.get(key);
    if (!t) {
      add(() => ({ path: `/estimates/${k}/target`, message: `"${key}" is not a target of ${vt.slug} v${vt.version}; target ids look like "${suggestTarget(key, vt)}" (GET /api/challenges/${vt.slug}/targets lists them)` }));
      continue;
    }
    const first = seen.get(key);
    if (first !== undefined) {
      add(() => ({ path: `/estimates/${k}/target`, message: `"${key}" appears twice (first at /estimates/${first}): give one estimate per target` }));
      continue;
    }
    seen.set(key, k);
    if (!isFiniteNumber(e.value) || !isFiniteNumber(e.uncertainty) || e.uncertainty < 0) continue;
    const a = Math.abs(e.value);
    if (a > t.bound + 3 * e.uncertainty) {
      add(() => ({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable} by more than 3 uncertainties; check the sign convention or the normalisation` }));
    } else if (a > t.bound && warnings.length < limit) {
      warnings.push({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable}, within 3 uncertainties (u = ${fmt(e.uncertainty as number)}): accepted, but worth a second look` });
    }
  }
  return { problems, total, warnings, covered: seen.size };
}

/** The warnings of a valid document: partial coverage, the estimates' own (bounds), a track that does not fit the method. */
export function documentWarnings(s: DocumentSummary, vt: VersionTargets, est: Pick<EstimateChecks, 'covered' | 'warnings'>): { warnings: FieldProblem[]; coverage: { targets: number; covered: number; fraction: number } } {
  const warnings: FieldProblem[] = [];
  const covered = est.covered;
  const n = vt.targets.size;
  const coverage = { targets: n, covered, fraction: n ? covered / n : 0 };
  if (covered < n) {
    warnings.push({ path: '/estimates', message: `covers ${covered} of the ${n} targets of ${vt.slug} v${vt.version} (${(100 * coverage.fraction).toFixed(1)}%): a partial sweep is accepted, and moderators and the standings show the coverage` });
  }
  warnings.push(...est.warnings);
  const hw = s.family === 'error-mitigated-hardware';
  if (s.track === 'classical' && hw) warnings.push({ path: '/track', message: 'track "classical" with method family "error-mitigated-hardware": use track "hardware" for results from a quantum processor' });
  if (s.track === 'hardware' && !hw && s.family !== 'other') warnings.push({ path: '/method/family', message: `track "hardware" with method family "${String(s.family)}": hardware entries normally use "error-mitigated-hardware"` });
  return { warnings, coverage };
}
