/**
 * One error model: AppError carries a code; one table maps codes to HTTP statuses; the final
 * handler shows the code, the message and the field problems, and hides everything else (the
 * internals go to the log under a correlation id that the response also carries).
 */
export type ErrorCode =
  | 'bad_request'
  | 'validation_failed'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'payload_too_large'
  | 'unsupported_media_type'
  | 'rate_limited'
  | 'unavailable'
  | 'internal';

export const STATUS: Record<ErrorCode, number> = {
  bad_request: 400,
  validation_failed: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  rate_limited: 429,
  unavailable: 503,
  internal: 500,
};

/** A problem with one field of a request, located by JSON pointer (RFC 6901). */
export interface FieldProblem {
  path: string;
  message: string;
}

export class AppError extends Error {
  constructor(
    public readonly code: ErrorCode,
    message: string,
    public readonly problems: FieldProblem[] = [],
    public readonly headers: Record<string, string> = {},
  ) {
    super(message);
  }
  get status(): number {
    return STATUS[this.code];
  }
}

/** Problems listed in one answer; the rest are counted in a last line (a huge list was a 13.5 MB answer). */
export const MAX_LISTED_PROBLEMS = 50;
export function capProblems(problems: FieldProblem[], total = problems.length): FieldProblem[] {
  if (problems.length <= MAX_LISTED_PROBLEMS && total <= problems.length) return problems;
  // already cut, with its count of the rest as the last line
  if (problems.length === MAX_LISTED_PROBLEMS + 1 && total <= problems.length && problems[MAX_LISTED_PROBLEMS].message.startsWith('... and ')) return problems;
  const listed = problems.slice(0, MAX_LISTED_PROBLEMS);
  listed.push({ path: '', message: `... and ${total - listed.length} more problem(s) not listed; fix these first` });
  return listed;
}

export const badRequest = (message: string, problems: FieldProblem[] = []) => new AppError('bad_request', message, problems);
export const invalid = (problems: FieldProblem[], message?: string) =>
  new AppError('validation_failed', message ?? `${problems[0]?.path || 'body'}: ${problems[0]?.message ?? 'invalid'}`, problems);
export const notFound = (what: string) => new AppError('not_found', `${what} was not found.`);
export const forbidden = (message = 'You do not have permission to do this.') => new AppError('forbidden', message);
export const unauthenticated = (message = 'Sign in first.') => new AppError('unauthenticated', message);
export const conflict = (message: string) => new AppError('conflict', message);
