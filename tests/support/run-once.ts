/**
 * Things built once per test run and shared by every test file that needs them (a prepared world,
 * a seeded data directory): the first test process that asks builds it into its own directory under
 * the run's cache directory (made by the project's global setup); the others wait for it. A build
 * happens only when some file of the run needs it, so a single test file pays for what it uses.
 *
 * Claiming is mkdir (atomic); the builder writes value.json last (rename), or error.txt if it failed,
 * so a waiting process fails at once with the builder's error instead of timing out.
 */
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export interface Built<T> { dir: string; value: T }

export async function buildOnce<T>(cacheDir: string, name: string, build: (dir: string) => Promise<T>, timeoutMs = 300_000): Promise<Built<T>> {
  const dir = path.join(cacheDir, name);
  const valueFile = path.join(dir, 'value.json');
  const errorFile = path.join(dir, 'error.txt');
  let mine = false;
  try {
    mkdirSync(dir);
    mine = true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
  }
  if (mine) {
    try {
      const value = await build(dir);
      writeFileSync(`${valueFile}.tmp`, JSON.stringify(value ?? null));
      renameSync(`${valueFile}.tmp`, valueFile);
      return { dir, value };
    } catch (e) {
      writeFileSync(errorFile, String((e as Error).stack ?? e));
      throw e;
    }
  }
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (existsSync(valueFile)) return { dir, value: JSON.parse(readFileSync(valueFile, 'utf8')) as T };
    if (existsSync(errorFile)) throw new Error(`building ${name} failed in another test process:\n${readFileSync(errorFile, 'utf8')}`);
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for another test process to build ${name}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
