/**
 * Structured logs: one JSON object a line, UTC time, level, event, fields. Values are strings or
 * numbers; CR/LF in any string are encoded so that a name cannot forge a log line; fields named
 * like secrets are never written.
 */
export type Level = 'debug' | 'info' | 'warn' | 'error';
export interface Logger {
  debug(event: string, fields?: Record<string, unknown>): void;
  info(event: string, fields?: Record<string, unknown>): void;
  warn(event: string, fields?: Record<string, unknown>): void;
  error(event: string, fields?: Record<string, unknown>): void;
}

const ORDER: Record<Level | 'silent', number> = { debug: 10, info: 20, warn: 30, error: 40, silent: 99 };
const SECRET = /pass(word)?|token|secret|cookie|authorization|api[-_]?key/i;

function clean(v: unknown, depth = 0): unknown {
  if (typeof v === 'string') return v.replace(/\r/g, '\\r').replace(/\n/g, '\\n').slice(0, 2000);
  if (v === null || typeof v !== 'object') return v;
  if (depth > 3) return '[deep]';
  if (Array.isArray(v)) return v.slice(0, 20).map((x) => clean(x, depth + 1));
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v)) out[k] = SECRET.test(k) ? '[redacted]' : clean(x, depth + 1);
  return out;
}

export function createLogger(level: Level | 'silent' = 'info', write: (line: string) => void = (l) => process.stdout.write(l + '\n')): Logger {
  const min = ORDER[level];
  const emit = (lv: Level) => (event: string, fields: Record<string, unknown> = {}) => {
    if (ORDER[lv] < min) return;
    write(JSON.stringify({ t: new Date().toISOString(), level: lv, event, ...(clean(fields) as object) }));
  };
  return { debug: emit('debug'), info: emit('info'), warn: emit('warn'), error: emit('error') };
}
