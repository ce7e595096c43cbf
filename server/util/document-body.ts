/**
 * Large JSON documents (entry documents, challenge specs) as request bodies, with bounded memory.
 *
 * A body is first streamed to a temporary file: a multipart field "file" through multer's disk
 * storage, any other body through a byte-counting pipe (inflating gzip or deflate on the way and
 * counting the inflated bytes, so a compression bomb stops at the limit). Only then does the request
 * take one of a few processing slots; holding a slot it reads the file into the slot's own reused
 * buffer (res.locals.document), which the strict JSON parser reads as bytes, and the slot is given
 * back when the response ends. So N concurrent maximum-size uploads cost N small
 * stream buffers while they arrive and at most `slots` documents in memory at once, instead of N
 * whole bodies held together (RELIABILITY.md 15: 20 concurrent maximum-size uploads add < 100 MB).
 * A slow client costs no slot while its body is still arriving.
 */
import { createWriteStream, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { open, unlink } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import { Transform, type TransformCallback } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGunzip, createInflate } from 'node:zlib';
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import { AppError, badRequest } from '../errors';

let spool: string | null = null;
const SPOOL_PREFIX = 'parallax-uploads-';

/** Spool directories of processes that no longer exist (killed before their exit handler ran). */
function removeStaleSpools() {
  try {
    for (const name of readdirSync(tmpdir())) {
      const pid = Number(/^parallax-uploads-(\d+)-/.exec(name)?.[1]);
      if (!pid || pid === process.pid) continue;
      try { process.kill(pid, 0); } catch (e) {
        if ((e as { code?: string }).code === 'ESRCH') rmSync(join(tmpdir(), name), { recursive: true, force: true });
      }
    }
  } catch { /* best effort: a spool left behind holds only partial uploads */ }
}

/** One spool directory per process (mode 0700), removed when the process exits. */
function spoolDir(): string {
  if (spool) return spool;
  removeStaleSpools();
  spool = join(tmpdir(), `${SPOOL_PREFIX}${process.pid}-${randomUUID().slice(0, 8)}`);
  mkdirSync(spool, { recursive: true, mode: 0o700 });
  const dir = spool;
  process.once('exit', () => { try { rmSync(dir, { recursive: true, force: true }); } catch { /* best effort */ } });
  return dir;
}

/** What a slot holder gets: a reusable buffer, and the slot back when done. */
export interface SlotLease {
  /** the slot's buffer, at least `bytes` long (allocated on first use, then reused) */
  buffer(bytes: number): Buffer;
  /** gives the slot back; reuse false drops its buffer (something may still read it) */
  release(reuse: boolean): void;
}

/**
 * A counting semaphore whose slots each own a buffer for one document: at most `size` holders, the
 * rest wait in arrival order. Reusing the buffers is what keeps memory flat under concurrent
 * uploads: a fresh buffer and string per document are garbage that V8 collects lazily, and 20 of
 * them at 10 MiB measured +200 MB of resident memory.
 */
export class Slots {
  private free: number;
  private readonly waiting: (() => void)[] = [];
  private readonly pool: Buffer[] = [];
  constructor(readonly size: number) { this.free = size; }
  acquire(): Promise<SlotLease> {
    return new Promise((resolve) => {
      const grant = () => {
        let released = false;
        let own: Buffer | null = this.pool.pop() ?? null;
        resolve({
          buffer: (bytes) => {
            if (!own || own.length < bytes) own = Buffer.allocUnsafeSlow(bytes);
            return own;
          },
          release: (reuse) => {
            if (released) return;
            released = true;
            if (reuse && own) this.pool.push(own);
            own = null;
            const next = this.waiting.shift();
            if (next) next(); else this.free++;
          },
        });
      };
      if (this.free > 0) { this.free--; grant(); } else this.waiting.push(grant);
    });
  }
  /** holders and waiters, for tests */
  get state() { return { size: this.size, free: this.free, waiting: this.waiting.length, pooled: this.pool.length }; }
}

class TooLarge extends Error {}

/** Counts bytes passing through and fails once more than `limit` have passed. */
function byteLimit(limit: number): Transform {
  let seen = 0;
  return new Transform({
    transform(chunk: Buffer, _enc: BufferEncoding, cb: TransformCallback) {
      seen += chunk.length;
      if (seen > limit) cb(new TooLarge()); else cb(null, chunk);
    },
  });
}

async function unlinkQuietly(path: string | undefined) {
  if (path) await unlink(path).catch(() => undefined);
}

export interface DocumentBodyOptions {
  /** largest document in bytes (after inflating) */
  limit: number;
  /** how many documents may be read and processed at once */
  slots: Slots;
  /** the error for a document over the limit (413) */
  tooLarge: () => AppError;
  /** the 400 for a multipart upload with the wrong field (names the field and the fix) */
  wrongField: string;
  /** whether a request without multipart may send the document as its raw body */
  rawBody: boolean;
}

/**
 * Middleware: leaves the document's bytes in res.locals.document (a Buffer view of the slot's
 * buffer, undefined when there was none) with a processing slot held until the response ends, or passes a 4xx error on. Without
 * multipart and with rawBody false the request passes untouched (its JSON body already parsed).
 */
export function documentBody(o: DocumentBodyOptions): RequestHandler {
  const upload = multer({
    storage: multer.diskStorage({ destination: (_req, _file, cb) => cb(null, spoolDir()), filename: (_req, _file, cb) => cb(null, `${randomUUID()}.upload`) }),
    limits: { fileSize: o.limit, files: 1, fields: 5, parts: 6 },
  }).single('file');

  const spoolRaw = async (req: Request): Promise<string | undefined> => {
    const declared = Number(req.headers['content-length']);
    const encoding = String(req.headers['content-encoding'] ?? 'identity').toLowerCase().trim();
    if (encoding === 'identity' && Number.isFinite(declared) && declared > o.limit) throw o.tooLarge();
    const charset = /charset=([^;]+)/i.exec(String(req.headers['content-type'] ?? ''))?.[1]?.trim().replace(/^"|"$/g, '').toLowerCase();
    if (charset && charset !== 'utf-8' && charset !== 'utf8' && charset !== 'us-ascii') {
      throw new AppError('unsupported_media_type', `The charset ${charset.slice(0, 40)} is not accepted: send the JSON document as UTF-8.`);
    }
    const inflate = encoding === 'gzip' || encoding === 'x-gzip' ? createGunzip() : encoding === 'deflate' ? createInflate() : encoding === 'identity' ? null : undefined;
    if (inflate === undefined) throw new AppError('unsupported_media_type', `The content encoding ${encoding.slice(0, 40)} is not accepted: send the document uncompressed, or with gzip or deflate.`);
    if (!req.readable || (Number.isFinite(declared) && declared === 0)) return undefined;
    const path = join(spoolDir(), `${randomUUID()}.body`);
    try {
      if (inflate) await pipeline(req, inflate, byteLimit(o.limit), createWriteStream(path, { mode: 0o600 }));
      else await pipeline(req, byteLimit(o.limit), createWriteStream(path, { mode: 0o600 }));
      return path;
    } catch (e) {
      await unlinkQuietly(path);
      if (e instanceof TooLarge) throw o.tooLarge();
      if ((e as { code?: string }).code === 'Z_DATA_ERROR' || (e as { code?: string }).code === 'Z_BUF_ERROR') throw badRequest(`The body is marked ${encoding} but does not inflate (${String((e as Error).message).slice(0, 80)}); send it uncompressed or compress it properly.`);
      if ((e as { code?: string }).code === 'ERR_STREAM_PREMATURE_CLOSE' || req.socket.destroyed) throw new AppError('bad_request', 'The request was aborted by the client.');
      throw e;
    }
  };

  const spoolMultipart = (req: Request, res: Response): Promise<string | undefined> => new Promise((resolve, reject) => {
    upload(req, res, (err?: unknown) => {
      if (!err) return resolve(req.file?.path);
      const code = (err as { code?: string }).code;
      if (code === 'LIMIT_FILE_SIZE') return reject(o.tooLarge());
      if (code === 'LIMIT_UNEXPECTED_FILE') return reject(badRequest(o.wrongField));
      reject(badRequest(`The multipart upload could not be read (${String((err as Error).message ?? err).slice(0, 120)}); send curl -F file=@document.json, or the JSON itself as the body.`));
    });
  });

  return (req: Request, res: Response, next: NextFunction) => {
    const multipart = req.is('multipart/form-data');
    if (!multipart && !o.rawBody) { next(); return; }
    (multipart ? spoolMultipart(req, res) : spoolRaw(req)).then(async (path) => {
      if (!path) return next();
      let lease: SlotLease | null = null;
      try {
        if (res.writableEnded || req.socket.destroyed) return; // the client went away meanwhile (req itself is destroyed once read)
        lease = await o.slots.acquire();
        const held = lease;
        // the buffer is reused only after a response that finished: a request whose client went
        // away may still have a handler reading it, so that buffer is dropped instead
        res.once('finish', () => held.release(true));
        res.once('close', () => held.release(false));
        res.locals.document = await readInto(path, held, o.limit);
        next();
      } catch (e) {
        lease?.release(false);
        next(e);
      } finally {
        await unlinkQuietly(path);
      }
    }, next);
  };
}

/** The spooled file's bytes, read into the slot's buffer: a view valid until the slot is released. */
async function readInto(path: string, lease: SlotLease, limit: number): Promise<Buffer> {
  const fh = await open(path, 'r');
  try {
    const size = (await fh.stat()).size;
    if (size > limit) throw new Error(`spooled document of ${size} bytes is over the limit`); // spooling stops at the limit: cannot happen
    const buf = lease.buffer(Math.max(size, 1));
    let at = 0;
    while (at < size) {
      const { bytesRead } = await fh.read(buf, at, size - at, at);
      if (!bytesRead) break;
      at += bytesRead;
    }
    return buf.subarray(0, at);
  } finally {
    await fh.close();
  }
}
