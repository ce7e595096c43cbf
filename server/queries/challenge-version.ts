/**
 * The challenge and version a request names (:slug, ?version=N): the loader every challenge read
 * route, export and moderation route uses.
 */
import type { Request } from 'express';
import { desc, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { challengeVersions, challenges } from '../db/schema';
import { badRequest, notFound } from '../errors';
import type { Actor } from '../middleware/actor';

/** Site moderators and admins (the role; whether they see sealed values is visibility.ts's question). */
export const isModeratorActor = (a: Actor) => a.kind === 'user' && (a.user.role === 'moderator' || a.user.role === 'admin');

/** The challenge and the version asked for (?version=N, default the current one). Drafts are for moderators only. */
export async function loadChallengeVersion(db: Db, req: Request) {
  const slug = String(req.params.slug);
  const [c] = await db.select().from(challenges).where(eq(challenges.slug, slug)).limit(1);
  const mod = isModeratorActor(req.actor);
  if (!c || (c.state === 'draft' && !mod)) throw notFound(`The challenge "${slug}"`);
  const wanted = req.query.version ? Number(req.query.version) : null;
  if (wanted !== null && !Number.isInteger(wanted)) throw badRequest('version must be a whole number, e.g. ?version=2');
  const versions = await db.select().from(challengeVersions).where(eq(challengeVersions.challengeSlug, slug)).orderBy(desc(challengeVersions.version));
  const visible = versions.filter((v) => v.state !== 'draft' || mod);
  const v = wanted !== null ? visible.find((x) => x.version === wanted) : visible.find((x) => x.id === c.currentVersionId) ?? visible[0];
  if (!v) throw notFound(wanted !== null ? `Version ${wanted} of "${slug}"` : `A version of "${slug}"`);
  return { challenge: c, version: v, versions: visible };
}
