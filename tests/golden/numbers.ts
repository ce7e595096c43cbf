/**
 * The public numbers of the fixture challenges (tests/fixtures/challenges), computed the way the
 * server computes them: the exact reference of every target (shared/physics/reference.ts, default
 * planner budget) and the standings (shared/scoring/standings.ts) of three invented entries made
 * from those references with a seeded generator. tests/golden/golden.test.ts compares them with the
 * golden files in tests/fixtures/golden/; `npm run golden` (scripts/golden.ts) rewrites those files.
 *
 * Each golden file records the engine and scoring-rules versions it was made with: a number that
 * changes while the version stays the same fails the test (bump the version, then regenerate).
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { validateChallenge } from '../../shared/physics/challenge';
import { ENGINE_VERSION, ReferenceRunner } from '../../shared/physics/reference';
import { createRng } from '../../shared/scoring/prng';
import { DEFAULT_ESTIMATOR, SCORING_RULES_VERSION } from '../../shared/scoring';
import { computeStandings, type StandingsEntryInput } from '../../shared/scoring/standings';

export const FIXTURES = fileURLToPath(new URL('../fixtures/challenges/', import.meta.url));
export const GOLDEN = fileURLToPath(new URL('../fixtures/golden/', import.meta.url));

/** the scoring rules' version (shared/scoring/rules.ts) */
export const RULES_VERSION = SCORING_RULES_VERSION;

export interface GoldenReference { value: number | null; method: string | null }
export interface GoldenStandingsRow { id: string; rank: number | null; metrics: Record<string, number | null> }
export interface Golden {
  challenge: string;
  /** the reference engine (ENGINE_VERSION) these references were computed with */
  engineVersion: string;
  /** the scoring rules these standings were computed with */
  rulesVersion: string;
  references: Record<string, GoldenReference>;
  standings: { rows: GoldenStandingsRow[]; consensus: Record<string, { value: number | null; uncertainty: number | null }> };
}

export const fixtureNames = () => readdirSync(FIXTURES).filter((f) => f.endsWith('.json')).map((f) => f.replace(/\.json$/, '')).sort();

/** 17 significant digits survive JSON exactly; a round trip keeps the numbers as computed */
const num = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

export function computeGolden(name: string): Golden {
  const v = validateChallenge(JSON.parse(readFileSync(path.join(FIXTURES, `${name}.json`), 'utf8')));
  if (!v.ok) throw new Error(`${name}: not a valid challenge: ${v.errors.map((e) => `${e.path} ${e.message}`).join('; ')}`);
  const runner = new ReferenceRunner(v.challenge);
  const references: Record<string, GoldenReference> = {};
  for (const t of v.challenge.targets) {
    const r = runner.run(t, runner.plan(t));
    references[t.id] = r.value === null ? { value: null, method: null } : { value: r.value, method: r.method };
  }
  // three invented entries around the references (seeded: the same every run)
  const rng = createRng(20261205);
  const keys = Object.keys(references);
  const made = (id: string, bias: number, sigma: number, u: number, skip: number): StandingsEntryInput => ({
    id, label: id, teamId: `team-${id}`, teamName: id, track: 'classical', methodFamily: 'other', submittedAt: '2026-01-01T00:00:00Z', isBaseline: false,
    cost: { cpuCoreHours: 1 + skip },
    estimates: new Map(keys.filter((_, i) => skip === 0 || i % (skip + 1) !== 0).map((k) => {
      const ref = references[k].value ?? 0.1;
      return [k, { value: ref + bias + sigma * rng.normal(), uncertainty: u, kind: 'statistical' as const }];
    })),
  });
  const entries = [made('close', 0, 0.005, 0.01, 0), made('biased', 0.03, 0.01, 0.01, 0), made('coarse', 0, 0.08, 0.1, 2)];
  const s = computeStandings({
    estimator: DEFAULT_ESTIMATOR,
    // every fourth target is scored as if its reference were sealed (a blind round): the consensus path
    targets: keys.map((k, i) => ({ key: k, reference: references[k].value === null || i % 4 === 3 ? null : { value: references[k].value!, uncertainty: 0 } })),
    entries,
  });
  const rows = s.entries.map((r) => {
    const rank = (r as unknown as { rank?: number | null }).rank ?? null;
    const metrics = Object.fromEntries(Object.entries(r.metrics as unknown as Record<string, unknown>).filter(([, x]) => typeof x === 'number' || x === null).map(([k, x]) => [k, num(x)]));
    return { id: r.id, rank, metrics };
  });
  const consensus = Object.fromEntries(s.targets.map((t) => [t.key, { value: num(t.value), uncertainty: num(t.uncertainty) }]));
  return { challenge: name, engineVersion: ENGINE_VERSION, rulesVersion: RULES_VERSION, references, standings: { rows, consensus } };
}

/** Relative difference beyond which a number counts as changed (the engines are deterministic; this only absorbs the last bit). */
export const TOLERANCE = 1e-12;

const same = (a: number | null, b: number | null) =>
  a === b || (a !== null && b !== null && Math.abs(a - b) <= TOLERANCE * Math.max(1, Math.abs(a), Math.abs(b)));

/** The differences between a stored golden file and a fresh computation, as readable lines. */
export function diffGolden(stored: Golden, fresh: Golden): { references: string[]; standings: string[] } {
  const references: string[] = [];
  for (const k of new Set([...Object.keys(stored.references), ...Object.keys(fresh.references)])) {
    const a = stored.references[k];
    const b = fresh.references[k];
    if (!a || !b) references.push(`${k}: ${a ? 'gone' : 'new'}`);
    else if (!same(a.value, b.value) || a.method !== b.method) references.push(`${k}: ${a.value} (${a.method}) -> ${b.value} (${b.method})`);
  }
  const standings: string[] = [];
  const rowsA = new Map(stored.standings.rows.map((r, i) => [r.id, { ...r, pos: i }]));
  fresh.standings.rows.forEach((b, i) => {
    const a = rowsA.get(b.id);
    if (!a) { standings.push(`${b.id}: new row`); return; }
    if (a.pos !== i || a.rank !== b.rank) standings.push(`${b.id}: place ${a.pos + 1} -> ${i + 1}`);
    for (const m of new Set([...Object.keys(a.metrics), ...Object.keys(b.metrics)])) {
      if (!same(a.metrics[m] ?? null, b.metrics[m] ?? null)) standings.push(`${b.id}.${m}: ${a.metrics[m]} -> ${b.metrics[m]}`);
    }
  });
  if (stored.standings.rows.length !== fresh.standings.rows.length) standings.push(`rows: ${stored.standings.rows.length} -> ${fresh.standings.rows.length}`);
  for (const k of Object.keys(fresh.standings.consensus)) {
    const a = stored.standings.consensus[k];
    const b = fresh.standings.consensus[k];
    if (!a || !same(a.value, b.value) || !same(a.uncertainty, b.uncertainty)) standings.push(`consensus ${k}: ${a?.value} ± ${a?.uncertainty} -> ${b.value} ± ${b.uncertainty}`);
  }
  return { references, standings };
}
