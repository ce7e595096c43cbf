/** Turns zod problems into the one error model: 400 naming the field (as a JSON pointer) and the fix. */
import type { z } from 'zod';
import { invalid, type FieldProblem } from './errors';

export function zodProblems(error: z.ZodError): FieldProblem[] {
  const esc = (p: PropertyKey) => String(p).replace(/~/g, '~0').replace(/\//g, '~1');
  return error.issues.slice(0, 50).flatMap((i) => {
    const pointer = i.path.map((p) => '/' + esc(p)).join('');
    if (i.code === 'unrecognized_keys') {
      return i.keys.map((k) => ({ path: `${pointer}/${esc(k)}`, message: `unknown field "${k}": remove it` }));
    }
    return [{ path: pointer, message: i.message }];
  });
}

export function parseBody<T extends z.ZodType>(schema: T, body: unknown): z.infer<T> {
  const r = schema.safeParse(body ?? {});
  if (!r.success) throw invalid(zodProblems(r.error));
  return r.data;
}
