/**
 * server/util/document-body.ts in isolation: the slots (first come, first served; a buffer reused
 * only after a clean release), the spooled body reaching the handler byte for byte, limits counted
 * after inflating, and the clean-up of spool directories that killed processes left behind.
 * The memory figure under 20 concurrent maximum uploads is in uploads.test.ts (a real process).
 */
import { existsSync, mkdirSync, readdirSync, writeFileSync, rmSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import express from 'express';
import { describe, expect, it } from 'vitest';
import { documentBody, Slots } from '../../server/util/document-body';
import { AppError } from '../../server/errors';

/** POST /doc on a listening copy of the app, bodies sent byte for byte (fetch) */
async function send(a: express.Express, init: { headers?: Record<string, string>; body?: Buffer | FormData }) {
  const srv = a.listen(0);
  await new Promise((r) => srv.once('listening', r));
  try {
    const r = await fetch(`http://127.0.0.1:${(srv.address() as { port: number }).port}/doc`, { method: 'POST', headers: init.headers, body: Buffer.isBuffer(init.body) ? new Uint8Array(init.body) : (init.body as FormData | undefined) });
    return { status: r.status, body: await r.json() };
  } finally {
    srv.close();
  }
}
const json = (body: Buffer, extra: Record<string, string> = {}) => ({ headers: { 'content-type': 'application/json', ...extra }, body });
const file = (body: Buffer, field = 'file') => { const f = new FormData(); f.append(field, new Blob([new Uint8Array(body)]), 'entry.json'); return { body: f }; };

function app(limit = 1024) {
  const slots = new Slots(2);
  const a = express();
  a.post('/doc', documentBody({ limit, slots, rawBody: true, tooLarge: () => new AppError('payload_too_large', 'too large'), wrongField: 'use the field "file"' }), (_req, res) => {
    const b = res.locals.document as Buffer | undefined;
    res.json({ bytes: b ? [...b] : null });
  });
  a.use((err: AppError, _req: express.Request, res: express.Response, _next: express.NextFunction) => { res.status(err.status ?? 500).json({ code: err.code, message: err.message }); });
  return { a, slots };
}

// first in the file: the spool directory is made (and stale ones removed) at a process's first upload
describe('spool directories', () => {
  it('removes spool directories of processes that are gone, and leaves its own files behind it none', async () => {
    const dead = spawnSync('true').pid!; // a child that has exited: its pid names no process now
    const stale = path.join(os.tmpdir(), `parallax-uploads-${dead}-deadbeef`);
    mkdirSync(stale, { recursive: true });
    writeFileSync(path.join(stale, 'half.upload'), 'partial');
    const { a } = app();
    expect((await send(a, file(Buffer.from('{}')))).status).toBe(200);
    expect(existsSync(stale)).toBe(false);
    const mine = readdirSync(os.tmpdir()).filter((n) => n.startsWith(`parallax-uploads-${process.pid}-`));
    // one per import of the module in this worker process (vitest re-imports per test file)
    expect(mine.length).toBeGreaterThanOrEqual(1);
    for (const d of mine) expect(readdirSync(path.join(os.tmpdir(), d))).toEqual([]); // every spooled body was unlinked
    rmSync(stale, { recursive: true, force: true });
  });
});

describe('document slots', () => {
  it('grant in arrival order, never more than their size at once', async () => {
    const s = new Slots(2);
    const order: number[] = [];
    const a = await s.acquire();
    const b = await s.acquire();
    const waiting = [3, 4].map((k) => s.acquire().then((l) => { order.push(k); return l; }));
    expect(s.state).toMatchObject({ free: 0, waiting: 2 });
    b.release(true);
    const c = await waiting[0];
    expect(order).toEqual([3]);
    a.release(true);
    const d = await waiting[1];
    expect(order).toEqual([3, 4]);
    c.release(true); d.release(true);
    c.release(true); // a second release is ignored
    expect(s.state).toMatchObject({ free: 2, waiting: 0 });
  });
  it('reuse a buffer only after a clean release', async () => {
    const s = new Slots(1);
    const first = await s.acquire();
    const buf = first.buffer(100);
    first.release(true);
    const second = await s.acquire();
    expect(second.buffer(50)).toBe(buf); // the same memory, big enough
    second.release(false); // something may still read it: dropped
    const third = await s.acquire();
    expect(third.buffer(50)).not.toBe(buf);
    expect(third.buffer(500).length).toBeGreaterThanOrEqual(500); // grown when a larger document comes
    third.release(true);
  });
});

describe('document bodies', () => {
  it('the handler gets the raw body, the multipart file, or the inflated gzip body, byte for byte', async () => {
    const { a, slots } = app();
    const doc = Buffer.from('{"π": 3.14159, "ok": true}');
    const raw = await send(a, json(doc));
    expect(raw.status).toBe(200);
    expect(Buffer.from(raw.body.bytes).equals(doc)).toBe(true);
    const up = await send(a, file(doc));
    expect(Buffer.from(up.body.bytes).equals(doc)).toBe(true);
    const gz = await send(a, json(gzipSync(doc), { 'content-encoding': 'gzip' }));
    expect(Buffer.from(gz.body.bytes).equals(doc)).toBe(true);
    expect((await send(a, json(Buffer.alloc(0)))).body.bytes).toBeNull();
    expect(slots.state).toMatchObject({ free: 2, waiting: 0 });
  });
  it('refuses over the limit (after inflating), a wrong field, a foreign charset and an unknown encoding', async () => {
    const { a, slots } = app(1024);
    expect((await send(a, json(Buffer.alloc(1025, 0x20)))).status).toBe(413);
    expect((await send(a, json(Buffer.alloc(1024, 0x20)))).status).toBe(200); // exactly the limit is allowed
    expect((await send(a, json(gzipSync(Buffer.alloc(4096, 0x20)), { 'content-encoding': 'gzip' }))).status).toBe(413);
    expect((await send(a, file(Buffer.alloc(1025, 0x20)))).status).toBe(413);
    const wrong = await send(a, file(Buffer.from('{}'), 'document'));
    expect(wrong.status).toBe(400);
    expect(wrong.body.message).toBe('use the field "file"');
    expect((await send(a, { headers: { 'content-type': 'application/json; charset=utf-16' }, body: Buffer.from('{}') })).status).toBe(415);
    expect((await send(a, json(Buffer.from('{}'), { 'content-encoding': 'zstd' }))).status).toBe(415);
    const bad = await send(a, json(Buffer.from('not gzip at all'), { 'content-encoding': 'gzip' }));
    expect(bad.status).toBe(400);
    expect(bad.body.message).toMatch(/does not inflate/);
    expect(slots.state).toMatchObject({ free: 2, waiting: 0 });
  });
});
