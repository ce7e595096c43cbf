/**
 * An exclusive, OS-level lock on a PGlite data directory. Two processes on one PGlite directory
 * corrupt it silently, and PGlite's postmaster.pid is not a real lock. We bind a Unix-domain
 * socket inside the directory: the kernel lets only one process listen on it, and releases it
 * when the process dies (even on kill -9), so a stale socket file is detected by a refused
 * connection and safely replaced.
 */
import net from 'node:net';
import { existsSync, mkdirSync, unlinkSync } from 'node:fs';
import path from 'node:path';

export class DataDirLockedError extends Error {
  constructor(public readonly dataDir: string) {
    super(
      `Another Parallax process is already using the data directory ${dataDir}. ` +
        'Stop it first, or start this one with a different DATA_DIR.',
    );
  }
}

export interface DirLock { release(): Promise<void> }

function listen(server: net.Server, sock: string): Promise<void> {
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(sock, () => { server.off('error', reject); resolve(); });
  });
}

function probe(sock: string): Promise<boolean> {
  return new Promise((resolve) => {
    const c = net.connect(sock);
    c.once('connect', () => { c.destroy(); resolve(true); });
    c.once('error', () => resolve(false));
  });
}

export async function lockDataDir(dataDir: string): Promise<DirLock> {
  mkdirSync(dataDir, { recursive: true });
  let sock = path.join(path.resolve(dataDir), '.parallax.lock');
  // Unix socket paths are limited to ~107 bytes; fall back to a relative path from the directory.
  if (Buffer.byteLength(sock) > 100) sock = path.relative(process.cwd(), sock);
  const server = net.createServer((c) => c.end());
  server.unref();
  try {
    await listen(server, sock);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw e;
    if (await probe(sock)) throw new DataDirLockedError(dataDir);
    // stale socket from a process that died: nobody listens, take it over
    if (existsSync(sock)) unlinkSync(sock);
    try {
      await listen(server, sock);
    } catch {
      throw new DataDirLockedError(dataDir);
    }
  }
  return {
    release: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
