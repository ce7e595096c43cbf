/**
 * Standings: recomputation of a challenge with 50 entries x 1,000 targets (target < 200 ms), and
 * the cached standings endpoint against a trivial Express route in the same process and run
 * (target >= 70% of its requests per second). Invented random data. Exits 1 on a MISS.
 * Short form (BENCH_SHORT=1): the same recomputations; the two autocannon runs (side by side, one
 * after the other in the same process) last 3 s each instead of 8 (BENCH_SECONDS overrides).
 */
import http from 'node:http';
import { randomUUID } from 'node:crypto';
import autocannon from 'autocannon';
import { openDatabase } from '../server/db/client';
import { applyMigrations } from '../server/db/migrate';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config';
import { createLogger } from '../server/log';
import { entries, estimates, organization, references, targets } from '../server/db/schema';
import { createChallengeVersion } from '../server/services/create-challenge-version';
import { publishChallengeVersion } from '../server/services/publish-challenge-version';
import { recomputeStandings } from '../server/services/recompute-standings';
import { createRng } from '../shared/scoring/prng';
import { eq } from 'drizzle-orm';

const database = await openDatabase({});
await applyMigrations(database);
const db = database.db;
const actor = { kind: 'system' as const, label: 'bench' };
const thetaH = Array.from({ length: 20 }, (_, i) => 0.05 * (i + 1));
const spec = { id: 'bench-chain', version: 1, title: 'Bench', description: 'bench', lattice: { kind: 'chain', n: 12 }, circuit: { family: 'kicked-ising', steps: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10], thetaH }, observables: [0, 3, 6, 9, 11].map((q) => ({ id: `z${q}`, pauli: `Z${q}` })) };
const made = await createChallengeVersion(db, spec, actor, new Date());
await publishChallengeVersion(db, { slug: 'bench-chain', actor, now: new Date() });
const ts = await db.select().from(targets).where(eq(targets.versionId, made.versionId));
const rng = createRng(42);
// half the targets get an invented exact value, the rest are scored by consensus
await db.insert(references).values(ts.map((t, i) => (i % 2 ? { targetId: t.id, value: rng.uniform() * 2 - 1, method: 'statevector' } : { targetId: t.id, value: null, method: 'none', reason: 'bench' })));
await db.insert(organization).values({ id: 'bench-team', name: 'Bench', slug: 'bench' });
for (let e = 0; e < 50; e++) {
  const id = randomUUID();
  await db.insert(entries).values({ id, lineageId: id, challengeSlug: 'bench-chain', versionId: made.versionId, teamId: 'bench-team', state: 'published', track: e % 3 ? 'classical' : 'hardware', methodFamily: 'other', label: `e${e}`, document: { resources: { cpuCoreHours: 1 + e } }, submittedAt: new Date() });
  const rows = ts.map((t) => ({ entryId: id, targetKey: t.key, value: rng.uniform() * 2 - 1, uncertainty: 0.01 + 0.05 * rng.uniform(), kind: 'statistical' }));
  for (let i = 0; i < rows.length; i += 1000) await db.insert(estimates).values(rows.slice(i, i + 1000));
}
console.log(`challenge: ${ts.length} targets, 50 entries`);

const times: number[] = [];
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  const { result: r } = await recomputeStandings(db, made.versionId, new Date());
  times.push(performance.now() - t0);
  console.log(`  run ${i + 1}: read ${r.timings.readMs.toFixed(0)} ms, compute ${r.timings.computeMs.toFixed(0)} ms, store ${r.timings.storeMs.toFixed(0)} ms`);
}
times.sort((a, b) => a - b);
const med = times[2];
console.log(`recompute standings (read + compute + store, one transaction): median ${med.toFixed(0)} ms, first ${times[0].toFixed(0)}..${times[4].toFixed(0)} ms (target < 200 ms) ${med < 200 ? 'PASS' : 'MISS'}`);

const config = { ...loadConfig({ DATA_DIR: '/tmp/parallax-bench-unused', AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-00' }), seedDemo: false, runWorker: false };
const { app } = await createApp({ database, mailer: { send: async () => {}, close: () => {} }, config, log: createLogger('silent'), serveClient: false });
app.get('/trivial', (_req, res) => { res.json({ ok: true }); });
const server = http.createServer(app);
await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
const port = (server.address() as { port: number }).port;
const seconds = Number(process.env.BENCH_SECONDS ?? (process.env.BENCH_SHORT === '1' ? 3 : 8));
const run = (path: string) => autocannon({ url: `http://127.0.0.1:${port}${path}`, connections: 10, duration: seconds });
await run('/api/challenges/bench-chain/standings'); // warm the cache and the JIT
const trivial = await run('/trivial');
const cached = await run('/api/challenges/bench-chain/standings');
const ratio = cached.requests.average / trivial.requests.average;
console.log(`trivial route: ${trivial.requests.average.toFixed(0)} req/s, p99 ${trivial.latency.p99} ms`);
console.log(`cached standings (${(JSON.stringify(await (await fetch(`http://127.0.0.1:${port}/api/challenges/bench-chain/standings`)).json()).length / 1024).toFixed(0)} KiB): ${cached.requests.average.toFixed(0)} req/s, p99 ${cached.latency.p99} ms, errors ${cached.errors + cached.non2xx}`);
console.log(`ratio ${(100 * ratio).toFixed(0)}% of the trivial route (target >= 70%) ${ratio >= 0.7 ? 'PASS' : 'MISS'}`);
server.close();
await database.close();
if (med >= 200 || ratio < 0.7) process.exitCode = 1;
