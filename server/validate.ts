/** Turns zod problems into the one error model: 400 naming the field (as a JSON pointer) and the fix. */
import type { z } from 'zod';
import { invalid, type FieldProblem } from './errors';

export function zodProblems(error: z.ZodError): FieldProblem[] {
  return error.issues.slice(0, 50).map((i) => {
    const pointer = '/' + i.path.map((p) => String(p).replace(/~/g, '~0').replace(/\//g, '~1')).join('/');
    let message = i.message;
    if (i.code === 'unrecognized_keys') message = `unknown field(s) ${i.keys.map((k) => `"${k}"`).join(', ')}: remove them`;
    return { path: pointer === '/' ? '' : pointer, message };
  });
}

export function parseBody<T extends z.ZodType>(schema: T, body: unknown): z.infer<T> {
  const r = schema.safeParse(body ?? {});
  if (!r.success) throw invalid(zodProblems(r.error));
  return r.data;
}
