/**
 * The app factory: everything the server does, given a database, a mailer, a clock and a config.
 * Tests build a fresh app on a fresh database with it; server/index.ts builds the real one.
 */
import { Slots } from './util/document-body';
import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { type ErrorRequestHandler, type Request, type Response, type NextFunction } from 'express';
import helmet from 'helmet';
import { toNodeHandler } from 'better-auth/node';
import { trustedOriginsOf, type Config } from './config';
import type { Database } from './db/client';
import type { Mailer } from './mail/mailer';
import type { Logger } from './log';
import { createAuth, CLIENT_IP_HEADER } from './auth';
import type { AppContext } from './context';
import { AppError, capProblems } from './errors';
import { refuseNul } from './validate';
import { actorMiddleware } from './middleware/actor';
import { signInThrottle } from './middleware/sign-in-throttle';
import { authPathGate } from './middleware/auth-paths';
import { createMailQueue } from './mail/queue';
import { originCheck } from './middleware/origin-check';
import { RouteTable } from './routes/registry';
import { registerAllRoutes } from './routes';
import { ThreadPool } from './jobs/thread-pool';
import { VersionCache } from './services/version-cache';
import { effectApplier } from './effects';
import { StandingsCache } from './services/standings-cache';

export interface AppDeps {
  database: Database;
  mailer: Mailer;
  config: Config;
  log: Logger;
  /** the clock; tests move it */
  now?: () => Date;
  /** serve the built client from dist/ (default: when dist/index.html exists) */
  serveClient?: boolean;
  /** install extra middleware before the client (the Vite dev server in `npm run dev`) */
  beforeClient?: (app: express.Express) => void | Promise<void>;
}

export type { AppContext } from './context';

export const DIST_DIR = fileURLToPath(new URL('../dist', import.meta.url));

export async function createApp(deps: AppDeps) {
  const now = deps.now ?? (() => new Date());
  const { config, log, database } = deps;
  const mailQueue = createMailQueue(log);
  const auth = createAuth({ db: database.db, config, mailer: deps.mailer, mailQueue, log, now });
  const ctx: AppContext = { database, db: database.db, auth, mailer: deps.mailer, mailQueue, config, log, now, jobs: { kick: () => {} }, documentSlots: new Slots(config.documentSlots), threads: new ThreadPool({ size: config.documentThreads }), versionCache: new VersionCache(), standingsCache: new StandingsCache(),
    // the one applier of after-commit effects (kicks read ctx.jobs at the time: boot and tests set the worker's kick later)
    applyEffects: (effects) => apply(effects) };
  const apply = effectApplier({ db: database.db, log, mail: { mailer: deps.mailer, baseUrl: config.baseUrl }, standingsCache: ctx.standingsCache, kick: () => ctx.jobs.kick() });
  const routes = new RouteTable();
  registerAllRoutes(routes, ctx);

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxyHops);
  app.set('query parser', 'simple');

  app.use((req: Request, res: Response, next: NextFunction) => {
    req.requestId = randomUUID();
    res.setHeader('X-Request-Id', req.requestId);
    const t0 = performance.now();
    res.on('finish', () => {
      if (!req.path.startsWith('/api')) return;
      log.info('http', {
        id: req.requestId, method: req.method, path: req.path, status: res.statusCode,
        ms: Math.round(performance.now() - t0), actor: req.actor?.kind === 'user' ? req.actor.user.id : req.actor?.kind,
      });
    });
    // the only client address better-auth sees is the one Express derived from the socket
    delete req.headers[CLIENT_IP_HEADER];
    req.headers[CLIENT_IP_HEADER] = req.ip ?? req.socket.remoteAddress ?? 'unknown';
    next();
  });

  app.use(
    helmet({
      contentSecurityPolicy: deps.beforeClient
        ? false // the Vite dev server injects inline scripts; production keeps the strict policy
        : {
            directives: {
              defaultSrc: ["'self'"],
              scriptSrc: ["'self'"],
              styleSrc: ["'self'", "'unsafe-inline'"],
              imgSrc: ["'self'", 'data:'],
              fontSrc: ["'self'", 'data:'],
              objectSrc: ["'none'"],
              baseUri: ["'none'"],
              frameAncestors: ["'none'"],
              formAction: ["'self'"],
            },
          },
      crossOriginEmbedderPolicy: false,
    }),
  );

  // better-auth: a body limit in front of it, the sign-in throttle, then its handler
  // (verify: a nesting-depth limit; better-call re-serialises the parsed body recursively and
  // overflowed the stack on JSON nested 10,000 deep, which was a 500: tests/server/abuse.test.ts)
  const authJson = express.json({ limit: '64kb', verify: refuseDeepJson });
  app.use('/api/auth', authJson, refuseNul);
  // CSRF: better-auth itself accepted cookie-bearing POSTs from a foreign Origin (sign-out,
  // organization/create, update-user, ...: tests/server/abuse.test.ts); the same check as /api
  app.use('/api/auth', originCheck(trustedOriginsOf(config)));
  // only the better-auth endpoints the product uses are open (admin and API-key plugin endpoints are not)
  app.use('/api/auth', authPathGate());
  app.post('/api/auth/sign-in/email', signInThrottle(database.db, config.signInThrottle, now));
  app.all('/api/auth/{*any}', toNodeHandler(auth));

  // PostgreSQL text cannot hold NUL: a %00 in a path parameter or query reached the database and
  // came back as a 500 (found by tests/server/fuzz.test.ts); refuse it up front
  app.use('/api', (req: Request, _res: Response, next: NextFunction) =>
    (req.originalUrl.includes('%00') || req.originalUrl.includes('\u0000') ? next(new AppError('bad_request', 'The URL contains a NUL character (%00), which no Parallax name or id contains.')) : next()));
  app.use('/api', actorMiddleware(auth, database.db, config.sessionMaxAgeSec * 1000, now));
  app.use('/api', originCheck(trustedOriginsOf(config)));
  // bodies are read per route after its access check (server/routes/registry.ts): a small JSON
  // limit by default, documentBody() on the routes that take large documents (entries, specs)
  const parseJson = express.json({ limit: config.jsonLimitBytes, verify: refuseDeepJson });
  const json = (req: Request, res: Response, next: NextFunction) => parseJson(req, res, (e?: unknown) => (e ? next(e) : refuseNul(req, res, next)));
  const api = express.Router();
  routes.mount(api, database.db, json, ctx.applyEffects);
  app.use('/api', api);
  app.use('/api', (req: Request, _res: Response, next: NextFunction) =>
    next(new AppError('not_found', `There is no API route ${req.method} ${req.path}. The routes are listed at /api/openapi.json.`)),
  );

  if (deps.beforeClient) await deps.beforeClient(app);
  const serveClient = deps.serveClient ?? existsSync(path.join(DIST_DIR, 'index.html'));
  if (serveClient) {
    app.use(express.static(DIST_DIR, { index: false, maxAge: '1h', setHeaders: (res, p) => {
      if (p.includes(`${path.sep}assets${path.sep}`)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
    } }));
    app.get('/{*splat}', (_req, res) => res.sendFile(path.join(DIST_DIR, 'index.html')));
  }

  app.use(errorHandler(log));
  return { app, auth, routes, ctx };
}

/** JSON nesting allowed in request bodies other than entry documents (those have their own strict parser). */
export const MAX_JSON_DEPTH = 64;

/**
 * express.json's verify hook: refuses a body nested deeper than MAX_JSON_DEPTH with a 400 before it is
 * parsed (JSON.parse copes with deep nesting, but recursive code after it may not).
 */
export function refuseDeepJson(_req: Request, _res: Response, buf: Buffer): void {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < buf.length; i++) {
    const c = buf[i];
    if (inString) {
      if (c === 0x5c) i++; // backslash: skip the escaped byte
      else if (c === 0x22) inString = false;
    } else if (c === 0x22) inString = true;
    else if (c === 0x5b || c === 0x7b) {
      if (++depth > MAX_JSON_DEPTH) throw Object.assign(new Error(`The JSON body is nested deeper than ${MAX_JSON_DEPTH} levels.`), { status: 400, type: 'entity.too.deep' });
    } else if (c === 0x5d || c === 0x7d) depth--;
  }
}

export function errorHandler(log: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    let e: AppError;
    if (err instanceof AppError) e = err;
    else if (err?.type === 'entity.too.large') e = new AppError('payload_too_large', `The request body is larger than the limit of ${err.limit} bytes.`);
    else if (err?.type === 'entity.parse.failed') e = new AppError('bad_request', `The request body is not valid JSON (${String(err.message).slice(0, 160)}). Send a JSON document with Content-Type: application/json.`);
    else if (err?.type === 'encoding.unsupported' || err?.type === 'charset.unsupported') e = new AppError('unsupported_media_type', 'Unsupported content encoding or charset; send UTF-8 JSON without compression.');
    else if (err?.type === 'request.aborted') e = new AppError('bad_request', 'The request was aborted by the client.');
    // multer/busboy errors carry no HTTP status: a malformed multipart body on a route that reads
    // uploads itself (POST /api/challenges) was a 500 (found by tests/server/fuzz.test.ts)
    else if (err?.name === 'MulterError') e = err.code === 'LIMIT_FILE_SIZE' ? new AppError('payload_too_large', 'The uploaded file is larger than the limit.') : new AppError('bad_request', `The multipart upload was refused (${String(err.message).slice(0, 120)}).`);
    else if (/^(Unexpected end of form|Malformed part header|Multipart: Boundary not found|Unexpected end of multipart data|Malformed urlencoded form)/.test(String(err?.message))) e = new AppError('bad_request', `The multipart body could not be read (${String(err.message).slice(0, 120)}).`);
    else if (typeof err?.status === 'number' && err.status >= 400 && err.status < 500) e = new AppError('bad_request', String(err.message ?? 'Bad request').slice(0, 200));
    else {
      log.error('unhandled', { id: req.requestId, path: req.path, error: String(err?.message ?? err), stack: String(err?.stack ?? '').split('\n').slice(0, 6).join(' | ') });
      e = new AppError('internal', `Something went wrong on our side. Quote request id ${req.requestId} if you report it.`);
    }
    if (e.code === 'unauthenticated' || e.code === 'forbidden') {
      log.warn('authz.denied', { id: req.requestId, method: req.method, path: req.path, code: e.code, actor: req.actor?.kind === 'user' ? req.actor.user.id : req.actor?.kind ?? 'visitor' });
    }
    if (res.headersSent) return;
    for (const [k, v] of Object.entries(e.headers)) res.setHeader(k, v);
    res.status(e.status).json({ error: { code: e.code, message: e.message.length > 2000 ? `${e.message.slice(0, 2000)}...` : e.message, problems: capProblems(e.problems), requestId: req.requestId } });
  };
}
