/**
 * Validating and storing one entry of 100,000 estimates (the format's limit) on an in-memory
 * PGlite: strict JSON parse of the text, JSON Schema, challenge checks (target ids, duplicates,
 * bounds, coverage) and the one-transaction write. Target (the issue): under 3 s.
 * Run: node --import tsx bench/entries.bench.ts. Exits 1 on a MISS. Short form (BENCH_SHORT=1): the
 * same (two entries of 100,000 estimates; it takes seconds).
 */
import { openDatabase } from '../server/db/client';
import { applyMigrations } from '../server/db/migrate';
import { organization } from '../server/db/schema';
import { createChallengeVersion } from '../server/services/create-challenge-version';
import { publishChallengeVersion } from '../server/services/publish-challenge-version';
import { checkEntry, parseEntryDocument } from '../server/services/validate-entry';
import { createEntry } from '../server/services/create-entry';

const TARGET_S = 3;
const n = 1000;
const steps = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
const thetaH = Array.from({ length: 10 }, (_, i) => 0.05 + 0.1 * i);
const spec = {
  id: 'bench-chain', version: 1, title: 'Bench chain', description: '100,000 targets', lattice: { kind: 'chain', n },
  circuit: { family: 'kicked-ising', steps, thetaH }, observables: Array.from({ length: n }, (_, q) => ({ id: `z${q}`, pauli: `Z${q}` })),
};

const database = await openDatabase({});
await applyMigrations(database);
const db = database.db;
const actor = { kind: 'system' as const, label: 'bench' };
const v = await createChallengeVersion(db, spec, actor, new Date());
await publishChallengeVersion(db, { slug: spec.id, actor, now: new Date() });
await db.insert(organization).values({ id: 'bench-team', name: 'Bench team', slug: 'bench-team' });
const { loadChallenge } = await import('../shared/physics/challenge');
const keys = loadChallenge(spec).targets.map((t) => t.id);

function documentText(seed: number): string {
  return JSON.stringify({
    challenge: { id: spec.id, version: 1, checksum: `sha256:${v.checksum}` }, track: 'classical', label: `bench ${seed}`,
    method: { family: 'tensor-network', settings: { bondDimension: 64 } },
    estimates: keys.map((k, i) => ({ target: k, value: Math.round(Math.cos(i + seed) * 1e6) / 1e6, uncertainty: 0.001, uncertaintyKind: 'statistical' })),
  });
}

async function once(seed: number) {
  const text = documentText(seed);
  const t0 = performance.now();
  const doc = parseEntryDocument(text);
  const t1 = performance.now();
  const check = await checkEntry(db, doc);
  const t2 = performance.now();
  await createEntry(db, { check, teamId: 'bench-team', actor, now: new Date() });
  const t3 = performance.now();
  return { bytes: text.length, total: (t3 - t0) / 1000, parse: (t1 - t0) / 1000, check: (t2 - t1) / 1000, store: (t3 - t2) / 1000, estimates: doc.estimates.length };
}

const cold = await once(1); // first entry for the version: the target table is read from the database
const warm = await once(2); // later entries: the published version's targets are cached
for (const [name, r] of [['first entry of a version', cold], ['later entry', warm]] as const) {
  console.log(`${name}: ${r.estimates} estimates, ${(r.bytes / 1024 / 1024).toFixed(2)} MiB: ${r.total.toFixed(2)} s (parse + schema ${r.parse.toFixed(2)} s, challenge checks ${r.check.toFixed(2)} s, store ${r.store.toFixed(2)} s)`);
}
const worst = Math.max(cold.total, warm.total);
console.log(`validate + store 100,000 estimates: ${worst.toFixed(2)} s (target < ${TARGET_S} s) ${worst < TARGET_S ? 'PASS' : 'MISS'}`);
await database.close();
if (worst >= TARGET_S) process.exitCode = 1;
