/**
 * The audit log for moderators and admins, newest first. Read-only: no route writes it except the
 * actions themselves, and the database refuses UPDATE and DELETE (drizzle/0001).
 */
import { and, desc, eq, lt, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { auditLog } from '../db/schema';
import { parseBody } from '../validate';
import type { RouteTable } from './registry';

const query = z.object({
  subjectType: z.string().min(1).max(50).optional(),
  subjectId: z.string().min(1).max(200).optional(),
  action: z.string().min(1).max(100).optional(),
  before: z.union([z.string().regex(/^\d{1,18}$/, 'a line id from "next"'), z.string().datetime({ offset: true })], { message: 'a line id (from "next") or an ISO date' }).optional(),
  limit: z.coerce.number().int().min(1).max(200).optional(),
}).strict();

export function registerAuditRoutes(routes: RouteTable, ctx: AppContext): void {
  routes.add({
    method: 'get', path: '/audit', access: 'moderator',
    summary: 'The audit log, newest first, at most 200 lines a page: ?subjectType=&subjectId=&action=&before=<id from "next" or ISO date>&limit=',
    handler: async (req) => {
      const q = parseBody(query, req.query);
      const conds: SQL[] = [];
      if (q.subjectType) conds.push(eq(auditLog.subjectType, q.subjectType));
      if (q.subjectId) conds.push(eq(auditLog.subjectId, q.subjectId));
      if (q.action) conds.push(eq(auditLog.action, q.action));
      if (q.before) conds.push(/^\d+$/.test(q.before) ? lt(auditLog.id, Number(q.before)) : lt(auditLog.at, new Date(q.before)));
      const limit = q.limit ?? 200;
      const rows = await ctx.db.select().from(auditLog).where(conds.length ? and(...conds) : undefined).orderBy(desc(auditLog.id)).limit(limit);
      return {
        lines: rows.map((r) => ({ id: r.id, at: r.at, actorId: r.actorId, actor: r.actorLabel, action: r.action, subjectType: r.subjectType, subjectId: r.subjectId, details: r.details })),
        next: rows.length === limit ? String(rows[rows.length - 1].id) : null,
      };
    },
  });
}
