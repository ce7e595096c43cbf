/**
 * Teams (better-auth organizations). Creating a team, inviting and accepting go through
 * better-auth's own endpoints (/api/auth/organization/*); these routes add the public team page,
 * the leads' view of invitations and the team's API keys.
 */
import { and, count, desc, eq } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { API_KEY_DEFAULT_TTL_MS } from '../auth';
import { apikey, invitation, member, organization, user } from '../db/schema';
import { notFound } from '../errors';
import { recordAudit } from '../services/record-audit';
import { readTeamMetadata } from '../services/team-rules';
import { parseBody } from '../validate';
import type { RouteTable } from './registry';


const createKeyBody = z.object({
  name: z.string().trim().min(1, 'give the key a name, e.g. "sweep script"').max(32, 'at most 32 characters'),
  expiresInDays: z.number().int().min(1).max(365).optional(),
}).strict();

export function registerTeamRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;

  routes.add({
    method: 'get', path: '/teams', access: 'public', summary: 'All teams with their member counts',
    handler: async () => {
      const rows = await db.select({ id: organization.id, name: organization.name, slug: organization.slug, metadata: organization.metadata, members: count(member.id) })
        .from(organization).leftJoin(member, eq(member.organizationId, organization.id))
        .groupBy(organization.id).orderBy(organization.name);
      return { teams: rows.map((r) => ({ ...readTeamMetadata(r.metadata), id: r.id, name: r.name, slug: r.slug, members: Number(r.members) })) };
    },
  });

  routes.add({
    method: 'get', path: '/teams/:teamId', access: 'public', summary: 'A team: name and members (names only, never e-mail addresses)',
    handler: async (req) => {
      const id = String(req.params.teamId);
      const [t] = await db.select().from(organization).where(eq(organization.id, id)).limit(1);
      if (!t) throw notFound('The team');
      const members = await db.select({ name: user.name, role: member.role, since: member.createdAt })
        .from(member).innerJoin(user, eq(user.id, member.userId)).where(eq(member.organizationId, id)).orderBy(user.name);
      // the typed metadata first, the authoritative fields last: nothing in metadata can replace them
      return {
        ...readTeamMetadata(t.metadata), id: t.id, name: t.name, slug: t.slug, createdAt: t.createdAt,
        members: members.map((m) => ({ name: m.name, role: m.role === 'owner' ? 'lead' : 'member', since: m.since })),
      };
    },
  });

  routes.add({
    method: 'get', path: '/teams/:teamId/invitations', access: 'team-lead', summary: 'Pending and past invitations of a team (leads only)',
    handler: async (req) => {
      const rows = await db.select({ id: invitation.id, email: invitation.email, role: invitation.role, status: invitation.status, expiresAt: invitation.expiresAt, createdAt: invitation.createdAt })
        .from(invitation).where(eq(invitation.organizationId, String(req.params.teamId))).orderBy(desc(invitation.createdAt));
      return { invitations: rows.map((r) => ({ ...r, role: r.role === 'owner' ? 'lead' : 'member' })) };
    },
  });

  routes.add({
    method: 'get', path: '/teams/:teamId/api-keys', access: 'team-lead', summary: "A team's API keys (never the secret itself)",
    handler: async (req) => {
      const rows = await db.select({ id: apikey.id, name: apikey.name, start: apikey.start, createdBy: user.name, createdAt: apikey.createdAt, expiresAt: apikey.expiresAt, lastRequest: apikey.lastRequest, enabled: apikey.enabled })
        .from(apikey).leftJoin(user, eq(user.id, apikey.createdBy)).where(eq(apikey.referenceId, String(req.params.teamId))).orderBy(desc(apikey.createdAt));
      return { keys: rows };
    },
  });

  routes.add({
    method: 'post', path: '/teams/:teamId/api-keys', access: 'team-lead', summary: 'Create a team API key; the secret is shown once',
    handler: async (req, res) => {
      const body = parseBody(createKeyBody, req.body);
      const teamId = String(req.params.teamId);
      if (req.actor.kind !== 'user') throw notFound('The session');
      const ttlMs = body.expiresInDays ? body.expiresInDays * 86400_000 : API_KEY_DEFAULT_TTL_MS;
      const created = await ctx.auth.api.createApiKey({
        body: { name: body.name, organizationId: teamId, userId: req.actor.user.id, expiresIn: Math.round(ttlMs / 1000) },
      });
      // who made the key: a ban of that person revokes it (admin.ts), and the actor middleware refuses it
      try {
        await db.update(apikey).set({ createdBy: req.actor.user.id }).where(eq(apikey.id, created.id));
      } catch (e) {
        await db.delete(apikey).where(eq(apikey.id, created.id));
        throw e;
      }
      await recordAudit(db, { actor: req.actor, action: 'api-key.create', subjectType: 'team', subjectId: teamId, at: ctx.now(), details: { keyId: created.id, name: body.name } });
      res.status(201);
      return { id: created.id, name: created.name, key: created.key, start: created.start, expiresAt: created.expiresAt };
    },
  });

  routes.add({
    method: 'delete', path: '/teams/:teamId/api-keys/:keyId', access: 'team-lead', summary: 'Revoke a team API key at once',
    handler: async (req) => {
      const teamId = String(req.params.teamId);
      const gone = await db.delete(apikey).where(and(eq(apikey.id, String(req.params.keyId)), eq(apikey.referenceId, teamId))).returning({ id: apikey.id });
      if (!gone.length) throw notFound('The API key');
      await recordAudit(db, { actor: req.actor, action: 'api-key.revoke', subjectType: 'team', subjectId: teamId, at: ctx.now(), details: { keyId: gone[0].id } });
      return { revoked: gone[0].id };
    },
  });
}
