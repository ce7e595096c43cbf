/** Every setting the server reads, from the environment, in one place (README lists them). */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { availableParallelism } from 'node:os';
import { DEFAULT_REFERENCE_BUDGET } from './planner-options';

export interface ScryptCost { N: number; r: number; p: number }

export interface Config {
  port: number;
  host: string;
  /** public origin of the app, used in e-mail links and the origin check */
  baseUrl: string;
  dataDir: string;
  databaseUrl?: string;
  /** when set, mail goes to this SMTP server instead of the in-process fake */
  smtpUrl?: string;
  /** port of the in-process fake SMTP server (0 = any free port) */
  fakeSmtpPort: number;
  mailFrom: string;
  authSecret: string;
  /** scrypt cost for passwords: N = 2^15, r = 8, p = 3 meets OWASP ASVS 5.0 level 2 */
  passwordHash: ScryptCost;
  /** absolute session lifetime in seconds, however active the session is */
  sessionMaxAgeSec: number;
  /** number of reverse proxies in front of the app (Express 'trust proxy' hop count) */
  trustProxyHops: number;
  /** the JSON body limit of every route that does not declare a document body (server/routes/registry.ts) */
  jsonLimitBytes: number;
  /** maximum upload size for entry files */
  uploadLimitBytes: number;
  /** how many large documents (entries, challenge specs) are read and processed at once */
  documentSlots: number;
  /** worker threads for document-sized work (entry checks, QASM, light cones, plans) */
  documentThreads: number;
  /** after the requests in flight at SIGTERM finish: how long new ones get 503 before the listener closes */
  shutdownDrainMs: number;
  /** extra origins trusted for cookie-bearing writes (e.g. the Vite dev server) */
  trustedOrigins: string[];
  seedDemo: boolean;
  logLevel: 'debug' | 'info' | 'warn' | 'error' | 'silent';
  /** failed sign-ins: free failures per (account, address) and per address, then doubling delays (server/middleware/sign-in-throttle.ts) */
  signInThrottle: { windowMs: number; maxFailures: number; perAddressFailures?: number; maxDelayMs?: number; forgetAfterMs?: number };
  /** teams and invitations (server/services/team-rules.ts): teams a user may lead, invitation mails per sender and per recipient */
  teamLimits: { teamsPerUser: number; invitesPerSenderPerHour: number; invitesPerRecipientPerDay: number };
  /** better-auth's own per-address limits per minute: sign-up, reset and verification requests */
  authRateLimits: { signUpPerMinute: number; mailPerMinute: number };
  /** exact-reference planner limits: estimated seconds per target, light-cone qubits, slice threads (= referenceThreads) */
  referenceBudget: { secondsPerTarget: number; coneQubitLimit: number; tnThreads: number };
  /** run reference jobs in this process */
  runWorker: boolean;
  /** worker threads that share the slices of one sliced tensor-network contraction (REFERENCE_THREADS) */
  referenceThreads: number;
  /**
   * a target whose tensor-network plan has a term of at least `above` slices is computed as up to
   * `perTerm` slice jobs per term that any worker process claims (TN_SLICE_JOBS_ABOVE, default 64 on
   * PostgreSQL, off on PGlite; TN_SLICE_JOBS_PER_TERM, default 8)
   */
  tnSliceJobs: { above: number | null; perTerm: number };
}

export const ASVS_SCRYPT: ScryptCost = { N: 2 ** 15, r: 8, p: 3 };

function secretFor(dataDir: string): string {
  if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
  mkdirSync(dataDir, { recursive: true });
  const f = path.join(dataDir, 'auth-secret');
  if (existsSync(f)) return readFileSync(f, 'utf8').trim();
  const s = randomBytes(32).toString('base64url');
  writeFileSync(f, s, { mode: 0o600 });
  return s;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = Number(env.PORT ?? 3000);
  const host = env.HOST ?? '127.0.0.1';
  const dataDir = path.resolve(env.DATA_DIR ?? './data');
  const referenceThreads = Math.max(1, Math.floor(Number(env.REFERENCE_THREADS ?? Math.max(2, availableParallelism() - 1))) || 1);
  return {
    port,
    host,
    baseUrl: (env.BASE_URL ?? `http://localhost:${port}`).replace(/\/$/, ''),
    dataDir,
    databaseUrl: env.DATABASE_URL || undefined,
    smtpUrl: env.SMTP_URL || undefined,
    fakeSmtpPort: Number(env.FAKE_SMTP_PORT ?? 2525),
    mailFrom: env.MAIL_FROM ?? 'Parallax <no-reply@parallax.localhost>',
    authSecret: secretFor(dataDir),
    passwordHash: ASVS_SCRYPT,
    sessionMaxAgeSec: Number(env.SESSION_MAX_AGE_DAYS ?? 30) * 86400,
    trustProxyHops: Number(env.TRUST_PROXY_HOPS ?? 0),
    jsonLimitBytes: 1024 * Number(env.JSON_LIMIT_KB ?? 64),
    uploadLimitBytes: 1024 * 1024 * Number(env.UPLOAD_LIMIT_MIB ?? 10),
    documentSlots: Math.max(1, Number(env.DOCUMENT_SLOTS ?? 2)),
    documentThreads: Math.max(1, Number(env.DOCUMENT_THREADS ?? env.DOCUMENT_SLOTS ?? 2)),
    shutdownDrainMs: Math.max(0, Number(env.SHUTDOWN_DRAIN_MS ?? 1000)),
    trustedOrigins: (env.TRUSTED_ORIGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean),
    seedDemo: env.SEED_DEMO !== '0',
    logLevel: (env.LOG_LEVEL as Config['logLevel']) ?? 'info',
    signInThrottle: { windowMs: 10_000, maxFailures: 3, perAddressFailures: 30, maxDelayMs: 15 * 60_000, forgetAfterMs: 86_400_000 },
    teamLimits: { teamsPerUser: 5, invitesPerSenderPerHour: 20, invitesPerRecipientPerDay: 3 },
    authRateLimits: { signUpPerMinute: 10, mailPerMinute: 5 },
    referenceBudget: { secondsPerTarget: Number(env.REFERENCE_SECONDS_BUDGET ?? DEFAULT_REFERENCE_BUDGET.secondsPerTarget), coneQubitLimit: Number(env.REFERENCE_CONE_QUBITS ?? DEFAULT_REFERENCE_BUDGET.coneQubitLimit), tnThreads: referenceThreads },
    runWorker: env.RUN_WORKER !== '0',
    referenceThreads,
    tnSliceJobs: {
      above: env.TN_SLICE_JOBS_ABOVE === '0' ? null : env.TN_SLICE_JOBS_ABOVE ? Number(env.TN_SLICE_JOBS_ABOVE) : env.DATABASE_URL ? 64 : null,
      perTerm: Math.max(1, Number(env.TN_SLICE_JOBS_PER_TERM ?? 8) || 8),
    },
  };
}

/**
 * The origins trusted for cookie-bearing writes (the origin check and better-auth): BASE_URL, the
 * loopback names of the port the server listens on (a browser at http://127.0.0.1:3000 or
 * http://[::1]:3000 is the same local server as http://localhost:3000; signing in there failed
 * with a bare "Invalid origin"), and TRUSTED_ORIGINS.
 */
export function trustedOriginsOf(config: Pick<Config, 'baseUrl' | 'port' | 'trustedOrigins'>): string[] {
  const loopback = ['localhost', '127.0.0.1', '[::1]'].map((h) => `http://${h}:${config.port}`);
  return [...new Set([config.baseUrl, ...loopback, ...config.trustedOrigins].map((o) => o.replace(/\/$/, '')))];
}
