/**
 * Real server processes for the durability, abuse and load checks: spawns the server prebuilt once
 * per run from `server/index.ts` (tests/support/build-server.ts; SEED_DEMO=0 by default), on a data
 * directory the caller owns, so a test can kill it (SIGKILL or SIGTERM) and start another process
 * on the same directory.
 *
 * prepareWorld() builds a small world in a data directory, in this process, through the API and a
 * PGlite opened on that directory: a moderator, the published chain-12 challenge with its exact
 * references, team A (lead and member) with an API key. The directory is closed again before any
 * server process opens it (two processes on one PGlite directory corrupt it). The world is built once
 * per test run (tests/support/run-once.ts) and copied into each caller's directory.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { cpSync, readFileSync, rmSync } from 'node:fs';
import { inject } from 'vitest';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createHash } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import { apikey } from '../../server/db/schema';
import { openDatabase, type Database } from '../../server/db/client';
import { applyMigrations } from '../../server/db/migrate';
import type { Config } from '../../server/config';
import { startWorker } from '../../server/jobs/worker';
import { appOnDatabase, setRole, signUpVerified, type TestApp } from './helpers';
import { freePort } from '../support/free-port';
import { buildOnce } from '../support/run-once';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const CHILD_AUTH_SECRET = 'child-secret-child-secret-child-secret-01';
const CHAIN_SPEC = JSON.parse(readFileSync(new URL('../fixtures/challenges/chain-small.json', import.meta.url), 'utf8'));
const FULL_ENTRY = JSON.parse(readFileSync(new URL('../fixtures/entries/chain-12-full.json', import.meta.url), 'utf8'));

export { freePort };

export interface ChildServer {
  url: string;
  pid: number;
  child: ChildProcess;
  /** milliseconds from spawn until the server printed that it is running */
  readyMs: number;
  /** the server's own figure: lock, database open (with any crash recovery) and migrations, in ms */
  openMs: number;
  output(): string;
  /** resolves with the exit code (null when killed by a signal) */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  kill(sig?: NodeJS.Signals): Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** resident set size of the server process in bytes (from /proc) */
  rss(): number;
}

/**
 * Starts `server/index.ts` on dataDir and waits until it listens. A free port can be taken by another
 * test process between choosing it and listening: on EADDRINUSE the start is retried on a new port.
 */
export async function spawnServer(dataDir: string, env: Record<string, string> = {}): Promise<ChildServer> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await spawnServerOnce(dataDir, env);
    } catch (e) {
      if (attempt >= 5 || !String((e as Error).message).includes('EADDRINUSE')) throw e;
    }
  }
}

async function spawnServerOnce(dataDir: string, env: Record<string, string>): Promise<ChildServer> {
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const t0 = performance.now();
  const child = spawn(process.execPath, [inject('serverBundle')], {
    cwd: ROOT,
    env: {
      ...process.env, DATA_DIR: dataDir, PORT: String(port), HOST: '127.0.0.1', BASE_URL: url, FAKE_SMTP_PORT: '0',
      LOG_LEVEL: 'warn', SEED_DEMO: '0', AUTH_SECRET: CHILD_AUTH_SECRET, DATABASE_URL: '', ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (d) => { out += d; });
  child.stderr!.on('data', (d) => { out += d; });
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((r) => child.once('exit', (code, signal) => r({ code, signal })));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start in 60 s:\n${out}`)), 60_000);
    const check = () => { if (out.includes('Parallax is running at')) { clearTimeout(timer); resolve(); } };
    child.stdout!.on('data', check);
    void exited.then(({ code }) => { clearTimeout(timer); reject(new Error(`server exited ${code}:\n${out}`)); });
  });
  const readyMs = performance.now() - t0;
  const openMs = Number(out.match(/opened in (\d+) ms/)?.[1] ?? NaN);
  return {
    url, pid: child.pid!, child, readyMs, openMs, exited,
    output: () => out,
    kill: async (sig: NodeJS.Signals = 'SIGTERM') => {
      if (child.exitCode === null && child.signalCode === null) child.kill(sig);
      return exited;
    },
    rss: () => {
      const m = readFileSync(`/proc/${child.pid}/status`, 'utf8').match(/VmRSS:\s+(\d+) kB/);
      return m ? Number(m[1]) * 1024 : 0;
    },
  };
}

/** An app in this process on a PGlite data directory (the same layout as the server's: dataDir/pglite). */
export async function openAppOn(dataDir: string, overrides: Partial<Config> = {}): Promise<TestApp> {
  const database = await openDatabase({ dataDir: path.join(dataDir, 'pglite') });
  await applyMigrations(database);
  return appOnDatabase(database, { DATA_DIR: dataDir, AUTH_SECRET: CHILD_AUTH_SECRET }, { baseUrl: 'http://parallax.test', ...overrides });
}

export interface World { keyA: string; teamA: string; checksum: string; targets: { key: string; reference: { value?: number } }[] }

/** See the header: moderator, published chain-12 with references, team A and its API key, copied into dataDir. Leaves the directory closed. */
export async function prepareWorld(dataDir: string): Promise<World> {
  const built = await buildOnce(inject('runCache'), 'child-world', (dir) => buildWorld(path.join(dir, 'data')));
  rmSync(dataDir, { recursive: true, force: true });
  cpSync(path.join(built.dir, 'data'), dataDir, { recursive: true });
  return built.value;
}

async function buildWorld(dataDir: string): Promise<World> {
  const t = await openAppOn(dataDir);
  try {
    const mod = await signUpVerified(t, 'mod@child.test', 'Moe Moderator');
    await setRole(t, 'mod@child.test', 'moderator');
    const worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 50 });
    t.ctx.jobs.kick = () => worker.kick();
    const c = await mod.post('/api/challenges', CHAIN_SPEC);
    if (c.status !== 201) throw new Error(`challenge ${c.status} ${c.text}`);
    const pub = await mod.post('/api/challenges/chain-12/publish', {});
    if (pub.status !== 200) throw new Error(`publish ${pub.status} ${pub.text}`);
    for (let i = 0; i < 1200; i++) {
      await worker.idle();
      const js = await t.database.db.query.jobs.findMany();
      if (js.every((j) => j.state === 'done' || j.state === 'failed')) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await worker.stop();
    const lead = await signUpVerified(t, 'lead-a@child.test', 'Lea Lead');
    const teamA = (await lead.post('/api/auth/organization/create', { name: 'Team A', slug: 'team-a' })).body.id as string;
    const k = await lead.post(`/api/teams/${teamA}/api-keys`, { name: 'sweep script' });
    if (k.status !== 201) throw new Error(`api key ${k.status} ${k.text}`);
    // the kill -9 loop writes far more than a key's hourly quota (1,000) in CI's 50 cycles: this test
    // key gets a larger one (the quota itself is tested in abuse.test.ts)
    await t.database.db.update(apikey).set({ rateLimitMax: 1_000_000 }).where(eq(apikey.id, k.body.id));
    const targets = (await mod.get('/api/challenges/chain-12/targets')).body.targets;
    return { keyA: k.body.key, teamA, checksum: pub.body.checksum, targets };
  } finally {
    await t.close();
  }
}

/** A valid full-sweep entry document for the prepared world (every target). */
export function entryDoc(w: World, label = 'durability') {
  return {
    ...FULL_ENTRY, label,
    challenge: { id: 'chain-12', version: 1, checksum: `sha256:${w.checksum}` },
    estimates: w.targets.map((x) => ({ target: x.key, value: x.reference.value ?? 0, uncertainty: 0.01, uncertaintyKind: 'statistical' })),
  };
}

/** Row count and an order-independent SHA-256 of every row of every public table. */
export async function tableHashes(database: Database, opts: { exclude?: string[] } = {}): Promise<Record<string, { rows: number; hash: string }>> {
  const r = (await database.db.execute(sql`select table_name from information_schema.tables where table_schema = current_schema() and table_type = 'BASE TABLE' order by table_name`)) as unknown as { rows: { table_name: string }[] };
  const out: Record<string, { rows: number; hash: string }> = {};
  for (const { table_name: name } of r.rows) {
    if (opts.exclude?.includes(name)) continue;
    const rows = (await database.db.execute(sql.raw(`select md5(t::text) as h from "${name}" t`))) as unknown as { rows: { h: string }[] };
    const hs = rows.rows.map((x) => x.h).sort();
    out[name] = { rows: hs.length, hash: createHash('sha256').update(hs.join('\n')).digest('hex').slice(0, 16) };
  }
  return out;
}
