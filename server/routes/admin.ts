/** Site administration: users and their roles, bans, and the outbox of the local fake mail server. */
import { desc, eq, ilike, or } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { mailMessages, user } from '../db/schema';
import { notFound } from '../errors';
import { changeUserRole, SITE_ROLES } from '../services/change-user-role';
import { banUser } from '../services/ban-user';
import { parseBody } from '../validate';
import type { RouteTable } from './registry';

const roleBody = z.object({ role: z.enum(SITE_ROLES, { message: 'role must be one of "user", "moderator", "admin"' }) }).strict();
const banBody = z.object({ banned: z.boolean(), reason: z.string().trim().max(500).optional() }).strict();

export function registerAdminRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;

  routes.add({
    method: 'get', path: '/admin/users', access: 'admin', summary: 'Users with their roles (admins only)',
    handler: async (req) => {
      const q = typeof req.query.q === 'string' ? req.query.q.slice(0, 100) : '';
      const rows = await db.select({ id: user.id, name: user.name, email: user.email, role: user.role, emailVerified: user.emailVerified, banned: user.banned, createdAt: user.createdAt })
        .from(user).where(q ? or(ilike(user.name, `%${q}%`), ilike(user.email, `%${q}%`)) : undefined).orderBy(user.createdAt).limit(500);
      return { users: rows.map((r) => ({ ...r, role: r.role ?? 'user', banned: Boolean(r.banned) })) };
    },
  });

  routes.add({
    method: 'post', path: '/admin/users/:userId/role', access: 'admin', summary: 'Grant or revoke the moderator (or admin) role',
    handler: async (req) => {
      const { role } = parseBody(roleBody, req.body);
      return changeUserRole(db, { userId: String(req.params.userId), role, actor: req.actor, now: ctx.now() });
    },
  });

  routes.add({
    method: 'post', path: '/admin/users/:userId/ban', access: 'admin', summary: 'Ban or unban a user: a ban ends their sessions, revokes the API keys they made and their team roles, at once',
    handler: async (req) => {
      const body = parseBody(banBody, req.body);
      return banUser(db, { userId: String(req.params.userId), banned: body.banned, reason: body.reason, actor: req.actor, now: ctx.now() });
    },
  });

  routes.add({
    method: 'get', path: '/admin/outbox', access: 'admin', summary: 'Messages received by the local fake mail server, newest first',
    handler: async (req) => {
      const to = typeof req.query.to === 'string' ? req.query.to.slice(0, 320) : '';
      const rows = await db.select({ id: mailMessages.id, receivedAt: mailMessages.receivedAt, from: mailMessages.from, to: mailMessages.to, subject: mailMessages.subject })
        .from(mailMessages).where(to ? ilike(mailMessages.to, `%${to}%`) : undefined).orderBy(desc(mailMessages.receivedAt)).limit(200);
      return { messages: rows };
    },
  });

  routes.add({
    method: 'get', path: '/admin/outbox/:messageId', access: 'admin', summary: 'One message of the outbox with its text',
    handler: async (req) => {
      const id = String(req.params.messageId);
      if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('The message');
      const [m] = await db.select().from(mailMessages).where(eq(mailMessages.id, id)).limit(1);
      if (!m) throw notFound('The message');
      return m;
    },
  });
}
