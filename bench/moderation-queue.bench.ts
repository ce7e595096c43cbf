/**
 * The moderation review queue: 30 entries in review with 500 estimates each, beside 10 published
 * entries (a consensus from the standings), exact references on 60% of the targets and 20% sealed.
 * GET /api/moderation/queue through the app, the first request (every check computed) against
 * the following ones (checks cached per entry revision and references/standings/other-entries
 * state), measured side by side in one run. Target: a repeated GET at least 5x faster than the
 * first. Invented random data.
 * Run: node --import tsx bench/moderation-queue.bench.ts. Exits 1 on a MISS.
 * Short form (BENCH_SHORT=1): the same queue, 3 timed requests of each kind instead of 5.
 */
import http from 'node:http';
import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { openDatabase } from '../server/db/client';
import { applyMigrations } from '../server/db/migrate';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config';
import { createLogger } from '../server/log';
import { entries, estimates, organization, references, targets, user } from '../server/db/schema';
import { createChallengeVersion } from '../server/services/create-challenge-version';
import { publishChallengeVersion } from '../server/services/publish-challenge-version';
import { recomputeStandings } from '../server/services/recompute-standings';
import { QueueChecksCache, reviewQueue, versionFingerprints } from '../server/services/check-entries';
import { createRng } from '../shared/scoring/prng';

const TARGET_RATIO = 5;
const IN_REVIEW = 30;
const PUBLISHED = 10;
const RUNS = process.env.BENCH_SHORT === '1' ? 3 : 5;

const database = await openDatabase({});
await applyMigrations(database);
const db = database.db;
const actor = { kind: 'system' as const, label: 'bench' };
// 10 steps x 10 fields x 5 observables = 500 targets
const spec = {
  id: 'bench-queue', version: 1, title: 'Bench queue', description: 'bench', lattice: { kind: 'chain', n: 12 },
  circuit: { family: 'kicked-ising', steps: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10], thetaH: Array.from({ length: 10 }, (_, i) => 0.05 + 0.1 * i) },
  observables: [0, 3, 6, 9, 11].map((q) => ({ id: `z${q}`, pauli: `Z${q}` })),
};
const made = await createChallengeVersion(db, spec, actor, new Date());
await publishChallengeVersion(db, { slug: spec.id, actor, now: new Date() });
const ts = await db.select().from(targets).where(eq(targets.versionId, made.versionId));
const rng = createRng(7);
const exact = new Map<string, number>();
const sealedUntil = new Date(Date.now() + 365 * 86_400_000);
await db.insert(references).values(ts.map((t, i) => {
  if (i % 5 === 4) return { targetId: t.id, value: null, method: 'none', reason: 'bench' };
  const value = rng.uniform() * 2 - 1;
  if (i % 5 !== 3) exact.set(t.key, value);
  return { targetId: t.id, value, method: 'statevector', sealedUntil: i % 5 === 3 ? sealedUntil : null };
}));
await db.insert(organization).values({ id: 'bench-team', name: 'Bench', slug: 'bench' });
const truth = new Map(ts.map((t) => [t.key, exact.get(t.key) ?? rng.uniform() * 2 - 1]));
const published: string[] = [];
async function entry(state: string, n: number, values: (key: string) => number) {
  const id = randomUUID();
  await db.insert(entries).values({ id, lineageId: id, challengeSlug: spec.id, versionId: made.versionId, teamId: 'bench-team', state, track: n % 3 ? 'classical' : 'hardware', methodFamily: 'other', label: `${state} ${n}`, document: { resources: { cpuCoreHours: 1 + n } }, submittedAt: new Date(Date.now() - 1000 * (100 - n)), publishedAt: state === 'published' ? new Date() : null });
  const rows = ts.map((t) => ({ entryId: id, targetKey: t.key, value: values(t.key), uncertainty: 0.01 + 0.02 * rng.uniform(), kind: 'statistical' }));
  for (let i = 0; i < rows.length; i += 1000) await db.insert(estimates).values(rows.slice(i, i + 1000));
  return id;
}
for (let e = 0; e < PUBLISHED; e++) published.push(await entry('published', e, (k) => truth.get(k)! + 0.02 * (rng.uniform() - 0.5)));
const copied = new Map<string, number>();
for (let e = 0; e < IN_REVIEW; e++) {
  // every fifth entry copies a published entry's values on a third of the targets
  const copyOf = e % 5 === 0 ? published[e % PUBLISHED] : null;
  if (copyOf && !copied.size) for (const r of await db.select().from(estimates).where(eq(estimates.entryId, copyOf))) copied.set(r.targetKey, r.value);
  await entry('in-review', e, (k) => (copyOf && copied.has(k) && k.length % 3 === 0 ? copied.get(k)! : truth.get(k)! + 0.05 * (rng.uniform() - 0.5)));
}
await recomputeStandings(db, made.versionId, new Date());
console.log(`challenge: ${ts.length} targets; ${IN_REVIEW} entries in review and ${PUBLISHED} published, ${ts.length} estimates each`);

// the app, and a moderator's session
const config = { ...loadConfig({ DATA_DIR: '/tmp/parallax-bench-unused', AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-00', BASE_URL: 'http://bench.test' }), seedDemo: false, runWorker: false, passwordHash: { N: 2 ** 10, r: 8, p: 1 } };
const { app } = await createApp({ database, mailer: { send: async () => {}, close: () => {} }, config, log: createLogger('silent'), serveClient: false });
const server = http.createServer(app);
await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
const base = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
const headers = { 'content-type': 'application/json', origin: 'http://bench.test' };
const credentials = JSON.stringify({ email: 'mod@bench.test', password: 'correct-horse-battery-9', name: 'Bench Moderator' });
const up = await fetch(`${base}/api/auth/sign-up/email`, { method: 'POST', headers, body: credentials });
if (!up.ok) throw new Error(`sign-up ${up.status} ${await up.text()}`);
await db.update(user).set({ emailVerified: true, role: 'moderator' }).where(eq(user.email, 'mod@bench.test'));
const signIn = await fetch(`${base}/api/auth/sign-in/email`, { method: 'POST', headers, body: credentials });
if (!signIn.ok) throw new Error(`sign-in ${signIn.status} ${await signIn.text()}`);
const cookie = signIn.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');

async function getQueue() {
  const t0 = performance.now();
  const r = await fetch(`${base}/api/moderation/queue`, { headers: { cookie } });
  const body = (await r.json()) as { count: number };
  if (!r.ok || body.count !== IN_REVIEW) throw new Error(`queue ${r.status} ${JSON.stringify(body).slice(0, 200)}`);
  return performance.now() - t0;
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const time = async (f: () => Promise<unknown>) => { const t0 = performance.now(); await f(); return performance.now() - t0; };
const cache = new QueueChecksCache();
const computed = JSON.stringify(await reviewQueue(db, new Date()));
await reviewQueue(db, new Date(), cache);
if (JSON.stringify(await reviewQueue(db, new Date(), cache)) !== computed) throw new Error('the cached queue differs from the computed one');
// side by side, interleaved: every check computed (each request before the cache) | from the cache
const uncached: number[] = [], cached: number[] = [], fingerprint: number[] = [], firstGet: number[] = [], get: number[] = [];
for (let i = 0; i < RUNS; i++) {
  uncached.push(await time(async () => JSON.stringify(await reviewQueue(db, new Date()))));
  cached.push(await time(async () => JSON.stringify(await reviewQueue(db, new Date(), cache))));
  fingerprint.push(await time(() => versionFingerprints(db, [made.versionId], new Date())));
}
// through the app: a standings row recomputed changes the fingerprint, so the next GET computes
for (let i = 0; i < RUNS; i++) {
  await recomputeStandings(db, made.versionId, new Date());
  firstGet.push(await getQueue());
  get.push(await getQueue());
}
const ms = (xs: number[]) => `median ${median(xs).toFixed(1)} ms (${xs.map((x) => x.toFixed(0)).join(', ')})`;
console.log(`review queue, every check computed (service + JSON): ${ms(uncached)}`);
console.log(`review queue, checks from the cache (service + JSON): ${ms(cached)}; of which the fingerprint query ${ms(fingerprint)}`);
console.log(`GET /api/moderation/queue after a change (computes): ${ms(firstGet)}`);
console.log(`GET /api/moderation/queue repeated (cached): ${ms(get)}`);
const ratio = median(firstGet) / median(get);
console.log(`repeated GET ${ratio.toFixed(1)}x faster than a computing one; service ${(median(uncached) / median(cached)).toFixed(1)}x (target >= ${TARGET_RATIO}x) ${ratio >= TARGET_RATIO ? 'PASS' : 'MISS'}`);
server.close();
await database.close();
if (ratio < TARGET_RATIO) process.exitCode = 1;
