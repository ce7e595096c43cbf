/**
 * Backup and restore drill (RELIABILITY.md item 4): a server writes entries and is stopped; then
 * `npm run db:backup` and `npm run db:restore` run as child processes with DATA_DIR, a server
 * starts on the restored directory, and every table's row count and row hash match the original.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/client';
import { entryDoc, prepareWorld, ROOT, spawnServer, tableHashes } from './child-server';

const run = promisify(execFile);
const root = mkdtempSync(path.join(os.tmpdir(), 'px-backup-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const hashesOf = async (dir: string) => {
  const db = await openDatabase({ dataDir: path.join(dir, 'pglite') });
  try { return await tableHashes(db); } finally { await db.close(); }
};

describe('backup and restore drill', () => {
  it('dump a stopped server, restore into a fresh directory, start on it: row counts and hashes match', async () => {
    const src = path.join(root, 'src');
    const dst = path.join(root, 'dst');
    const world = await prepareWorld(src);
    const s = await spawnServer(src);
    for (let i = 0; i < 5; i++) {
      const r = await fetch(`${s.url}/api/challenges/chain-12/entries`, { method: 'POST', headers: { 'x-api-key': world.keyA, 'content-type': 'application/json' }, body: JSON.stringify(entryDoc(world, `backup-${i}`)) });
      expect(r.status).toBe(201);
    }
    expect((await s.kill('SIGTERM')).code).toBe(0);
    const original = await hashesOf(src);

    const file = path.join(root, 'backup.sql');
    const env = { ...process.env, DATABASE_URL: '', AUTH_SECRET: 'x'.repeat(40) };
    const t0 = performance.now();
    await run('npm', ['run', '-s', 'db:backup', '--', file], { cwd: ROOT, env: { ...env, DATA_DIR: src } });
    const t1 = performance.now();
    await run('npm', ['run', '-s', 'db:restore', '--', file], { cwd: ROOT, env: { ...env, DATA_DIR: dst } });
    const t2 = performance.now();
    // restoring over an existing database is refused without --force
    await expect(run('npm', ['run', '-s', 'db:restore', '--', file], { cwd: ROOT, env: { ...env, DATA_DIR: dst } })).rejects.toThrow();

    const restored = await hashesOf(dst);
    expect(Object.keys(restored).sort()).toEqual(Object.keys(original).sort());
    const differing = Object.keys(original).filter((k) => JSON.stringify(original[k]) !== JSON.stringify(restored[k]));
    expect(differing, 'tables whose rows differ after restore').toEqual([]);

    // a server starts on the restored directory and serves the data
    const again = await spawnServer(dst);
    const g = await fetch(`${again.url}/api/teams/${world.teamA}/entries`, { headers: { 'x-api-key': world.keyA } });
    expect(g.status).toBe(200);
    expect(((await g.json()) as { entries: unknown[] }).entries).toHaveLength(5);
    expect((await again.kill('SIGTERM')).code).toBe(0);
    const rows = Object.values(original).reduce((a, x) => a + x.rows, 0);
    console.log(`[backup] ${Object.keys(original).length} tables, ${rows} rows: counts and hashes identical after restore; dump ${Math.round(statSync(file).size / 1024)} KiB in ${Math.round(t1 - t0)} ms, restore ${Math.round(t2 - t1)} ms (npm scripts incl. start-up); the restored server started in ${Math.round(again.readyMs)} ms`);
  }, 300_000);
});
