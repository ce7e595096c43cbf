/**
 * Structured logs: one JSON object a line, UTC time, level, event, fields. Values are strings or
 * numbers; CR/LF in any string are encoded so that a name cannot forge a log line; fields named
 * like secrets are never written. A line never holds a whole document: strings are cut at
 * MAX_STRING characters, objects at MAX_KEYS keys, lists at 20 items, and a line longer than
 * MAX_LINE is written with its fields cut shorter still.
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

export const MAX_STRING = 1000;
export const MAX_KEYS = 30;
export const MAX_LINE = 8192;

function clean(v: unknown, depth = 0, max = MAX_STRING): unknown {
  if (typeof v === 'string') {
    const s = v.length > max ? `${v.slice(0, max)}...[${v.length - max} more characters]` : v;
    return s.replace(/\r/g, '\\r').replace(/\n/g, '\\n');
  }
  if (v === null || typeof v !== 'object') return v;
  if (depth > 3) return '[deep]';
  if (Array.isArray(v)) return v.slice(0, 20).map((x) => clean(x, depth + 1, max));
  const out: Record<string, unknown> = {};
  let n = 0;
  for (const k in v) {
    if (!Object.prototype.hasOwnProperty.call(v, k)) continue;
    if (++n > MAX_KEYS) { out['...'] = 'more fields not logged'; break; }
    const key = k.length > 100 ? `${k.slice(0, 100)}...` : k;
    out[key] = SECRET.test(k) ? '[redacted]' : clean((v as Record<string, unknown>)[k], depth + 1, max);
  }
  return out;
}

export function createLogger(level: Level | 'silent' = 'info', write: (line: string) => void = (l) => process.stdout.write(l + '\n')): Logger {
  const min = ORDER[level];
  const emit = (lv: Level) => (event: string, fields: Record<string, unknown> = {}) => {
    if (ORDER[lv] < min) return;
    let line = JSON.stringify({ t: new Date().toISOString(), level: lv, event, ...(clean(fields) as object) });
    if (line.length > MAX_LINE) line = JSON.stringify({ t: new Date().toISOString(), level: lv, event, ...(clean(fields, 0, 200) as object), truncated: true });
    if (line.length > MAX_LINE) line = JSON.stringify({ t: new Date().toISOString(), level: lv, event, truncated: true, note: 'fields too large to log' });
    write(line);
  };
  return { debug: emit('debug'), info: emit('info'), warn: emit('warn'), error: emit('error') };
}
