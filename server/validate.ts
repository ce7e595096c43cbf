/**
 * Turns zod problems into the one error model: 400 naming the field (as a JSON pointer) and the
 * fix, at most MAX_LISTED_PROBLEMS listed; and the rules every parsed JSON body obeys (no NUL).
 */
import type { NextFunction, Request, Response } from 'express';
import type { z } from 'zod';
import { AppError, MAX_LISTED_PROBLEMS, capProblems, invalid, type FieldProblem } from './errors';

const esc = (p: PropertyKey) => String(p).replace(/~/g, '~0').replace(/\//g, '~1');
const clip = (k: string) => (k.length > 60 ? `${k.slice(0, 60)}...` : k);

export function zodProblems(error: z.ZodError): FieldProblem[] {
  const out: FieldProblem[] = [];
  let total = 0;
  for (const i of error.issues) {
    const pointer = i.path.map((p) => '/' + esc(p)).join('');
    // one issue may name 200,000 unknown keys: the list is cut after flattening
    const items = i.code === 'unrecognized_keys' ? i.keys : [null];
    for (const k of items) {
      total++;
      if (out.length >= MAX_LISTED_PROBLEMS) continue;
      out.push(k === null ? { path: pointer, message: i.message } : { path: `${pointer}/${esc(clip(k))}`, message: `unknown field "${clip(k)}": remove it` });
    }
  }
  return capProblems(out, total);
}

/**
 * The fields of a parsed JSON value whose key or string holds a NUL character (PostgreSQL text
 * cannot store it: it was a 500 that logged the whole document). The strict parser of documents
 * (server/util/strict-json.ts) refuses the same; this is the rule for every other JSON body.
 */
export function nulProblems(v: unknown, ptr = '', out: FieldProblem[] = [], budget = { n: 100_000 }): FieldProblem[] {
  if (out.length >= MAX_LISTED_PROBLEMS || --budget.n < 0) return out;
  if (typeof v === 'string') {
    if (v.includes('\u0000')) out.push({ path: ptr, message: 'holds a NUL character (\\u0000), which no Parallax text may contain: remove it' });
  } else if (Array.isArray(v)) {
    v.forEach((x, i) => nulProblems(x, `${ptr}/${i}`, out, budget));
  } else if (v !== null && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) {
      if (k.includes('\u0000')) out.push({ path: ptr, message: 'a key of this object holds a NUL character (\\u0000), which no Parallax field name contains: remove it' });
      else nulProblems(x, `${ptr}/${esc(k)}`, out, budget);
    }
  }
  return out;
}

/** Middleware after a JSON body parser: a NUL character anywhere in the body is a 400 naming the field. */
export function refuseNul(req: Request, _res: Response, next: NextFunction): void {
  const problems = req.body && typeof req.body === 'object' ? nulProblems(req.body) : [];
  if (problems.length) next(new AppError('bad_request', `${problems[0].path || 'The body'}: ${problems[0].message}`, problems));
  else next();
}

export function parseBody<T extends z.ZodType>(schema: T, body: unknown): z.infer<T> {
  const nul = nulProblems(body);
  if (nul.length) throw invalid(nul);
  const r = schema.safeParse(body ?? {});
  if (!r.success) throw invalid(zodProblems(r.error));
  return r.data;
}
