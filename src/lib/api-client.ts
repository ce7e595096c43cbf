/**
 * The one API client. Every call to our own routes (/api/*) and every better-auth call goes
 * through here so that errors are mapped once: our routes answer
 * `{error:{code,message,problems,requestId}}`, better-auth answers `{code,message}`. A 401 from
 * our routes means the session is gone: the registered handler (the me-query) hears about it once.
 */

export interface FieldProblem {
  /** a JSON pointer like "/name" */
  path: string;
  message: string;
}

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly problems: FieldProblem[];
  readonly requestId?: string;
  readonly retryAfterSec?: number;
  constructor(init: { status: number; code: string; message: string; problems?: FieldProblem[]; requestId?: string; retryAfterSec?: number }) {
    super(init.message);
    this.name = 'ApiError';
    this.status = init.status;
    this.code = init.code;
    this.problems = init.problems ?? [];
    this.requestId = init.requestId;
    this.retryAfterSec = init.retryAfterSec;
  }
  /** the message for one field (path "/name" or "name"), if the server named it */
  problemFor(field: string): string | undefined {
    const p = field.startsWith('/') ? field : `/${field}`;
    return this.problems.find((x) => x.path === p || x.path.startsWith(`${p}/`))?.message;
  }
}

/** Plain-language fallbacks by status, used when the server gave no message. */
const FALLBACK: Record<number, string> = {
  0: 'The server could not be reached. Check your connection and try again.',
  400: 'The request was not accepted. Check the fields and try again.',
  401: 'You are not signed in (or your session ended). Sign in and try again.',
  403: 'You do not have permission to do this.',
  404: 'This was not found. It may have been removed, or the link is mistyped.',
  409: 'This conflicts with something that already exists.',
  413: 'This is larger than the server accepts.',
  429: 'Too many attempts. Wait a moment and try again.',
  500: 'Something went wrong on our side. Try again in a moment.',
  503: 'The server is busy or restarting. Try again in a moment.',
};

/** Better-auth error codes that deserve friendlier words than its defaults. */
const AUTH_MESSAGES: Record<string, string> = {
  INVALID_EMAIL_OR_PASSWORD: 'The e-mail address or password is wrong.',
  EMAIL_NOT_VERIFIED: 'Confirm your e-mail address first: open the link in the confirmation mail we sent you.',
  USER_ALREADY_EXISTS: 'An account with this e-mail address already exists. Sign in, or reset the password.',
  USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL: 'An account with this e-mail address already exists. Sign in, or reset the password.',
  PASSWORD_TOO_SHORT: 'The password is too short: use at least 10 characters.',
  PASSWORD_TOO_LONG: 'The password is too long: use at most 128 characters.',
  INVALID_PASSWORD: 'The current password is wrong.',
  INVALID_TOKEN: 'This link is invalid or has expired. Ask for a new one.',
  ORGANIZATION_ALREADY_EXISTS: 'A team with this slug already exists; choose another slug.',
  ORGANIZATION_SLUG_ALREADY_TAKEN: 'A team with this slug already exists; choose another slug.',
  USER_IS_ALREADY_A_MEMBER_OF_THIS_ORGANIZATION: 'This person is already a member of the team.',
  USER_IS_ALREADY_INVITED_TO_THIS_ORGANIZATION: 'This address already has a pending invitation.',
  INVITATION_NOT_FOUND: 'This invitation was not found, has expired, or was already used.',
  YOU_ARE_NOT_THE_RECIPIENT_OF_THE_INVITATION: 'This invitation was sent to another e-mail address. Sign in with the address it was sent to.',
  BANNED_USER: 'This account has been suspended. Contact the Parallax admins.',
};

let onUnauthenticated: (() => void) | null = null;
/** The me-query registers here: a 401 from our routes invalidates it, once, in one place. */
export function setUnauthenticatedHandler(fn: () => void): void {
  onUnauthenticated = fn;
}

function retryAfter(h: Headers | undefined): number | undefined {
  const v = h?.get('retry-after');
  if (!v) return undefined;
  const n = Number(v);
  return Number.isFinite(n) ? n : undefined;
}

/** Turns any error body (ours or better-auth's) into an ApiError. */
export function toApiError(status: number, body: unknown, headers?: Headers): ApiError {
  const b = (body ?? {}) as Record<string, unknown>;
  const ours = b.error as { code?: string; message?: string; problems?: FieldProblem[]; requestId?: string } | undefined;
  if (ours && typeof ours === 'object') {
    return new ApiError({
      status,
      code: ours.code ?? 'error',
      message: ours.message || FALLBACK[status] || FALLBACK[500],
      problems: Array.isArray(ours.problems) ? ours.problems : [],
      requestId: ours.requestId,
      retryAfterSec: retryAfter(headers),
    });
  }
  const code = typeof b.code === 'string' ? b.code : `http_${status}`;
  const message = AUTH_MESSAGES[code] ?? (typeof b.message === 'string' && b.message ? b.message : FALLBACK[status] ?? FALLBACK[500]);
  return new ApiError({ status, code, message, retryAfterSec: retryAfter(headers) });
}

type Query = Record<string, string | number | boolean | undefined | null>;

export interface RequestOptions {
  query?: Query;
  /** a JSON value, or a FormData (multipart uploads: sent as it is) */
  body?: unknown;
  signal?: AbortSignal;
}

/** a file as the multipart field "file", the field every upload route reads */
export function fileForm(file: File): FormData {
  const fd = new FormData();
  fd.append('file', file, file.name);
  return fd;
}

async function request<T>(method: string, path: string, opts: RequestOptions = {}): Promise<T> {
  let url = `/api${path}`;
  if (opts.query) {
    const qs = new URLSearchParams();
    for (const [k, v] of Object.entries(opts.query)) if (v !== undefined && v !== null && v !== '') qs.set(k, String(v));
    const s = qs.toString();
    if (s) url += `?${s}`;
  }
  const form = opts.body instanceof FormData;
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      credentials: 'include',
      headers: { Accept: 'application/json', ...(opts.body !== undefined && !form ? { 'Content-Type': 'application/json' } : {}) },
      body: form ? (opts.body as FormData) : opts.body !== undefined ? JSON.stringify(opts.body) : undefined,
      signal: opts.signal,
    });
  } catch (e) {
    if ((e as Error).name === 'AbortError') throw e;
    throw new ApiError({ status: 0, code: 'network', message: FALLBACK[0] });
  }
  const text = await res.text();
  let data: unknown = undefined;
  if (text) {
    try { data = JSON.parse(text); } catch { data = undefined; }
  }
  if (!res.ok) {
    const err = toApiError(res.status, data, res.headers);
    if (res.status === 401 && path !== '/me') onUnauthenticated?.();
    throw err;
  }
  return data as T;
}

export const api = {
  get: <T>(path: string, opts?: RequestOptions) => request<T>('GET', path, opts),
  post: <T>(path: string, body?: unknown, opts?: RequestOptions) => request<T>('POST', path, { ...opts, body: body ?? {} }),
  put: <T>(path: string, body?: unknown, opts?: RequestOptions) => request<T>('PUT', path, { ...opts, body: body ?? {} }),
  delete: <T>(path: string, opts?: RequestOptions) => request<T>('DELETE', path, opts),
};

/**
 * Unwraps a better-auth client result `{ data, error }` into data or an ApiError, so forms treat
 * better-auth and our routes alike.
 */
export async function authCall<T>(p: Promise<{ data: T | null; error: { status: number; code?: string; message?: string; statusText?: string } | null }>): Promise<T> {
  let r;
  try {
    r = await p;
  } catch (e) {
    if (e instanceof ApiError) throw e;
    throw new ApiError({ status: 0, code: 'network', message: FALLBACK[0] });
  }
  if (r.error) {
    const err = r.error;
    const ours = (err as unknown as { error?: unknown }).error; // our 429 throttle body comes through as-is
    throw toApiError(err.status, ours ? { error: ours } : { code: err.code, message: err.message }, undefined);
  }
  return r.data as T;
}

/** The message to show for any thrown value. */
export function errorMessage(e: unknown): string {
  if (e instanceof ApiError) return e.message;
  if (e instanceof Error) return e.message;
  return 'Something went wrong.';
}
