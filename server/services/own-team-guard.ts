/**
 * A moderator never judges their own team's work (issue 12 item 10): decisions (publish, return,
 * reject) and curation (feature, hide) on an entry of a team the moderator belongs to are refused
 * with 403. Called inside the decide and curate transactions, after the entry row is locked.
 */
import { and, eq } from 'drizzle-orm';
import type { DbOrTx } from '../db/client';
import { member, organization } from '../db/schema';
import { forbidden } from '../errors';
import type { AuditActor } from './record-audit';

export async function refuseOwnTeamEntry(db: DbOrTx, actor: AuditActor, teamId: string, what: string): Promise<void> {
  if (actor.kind !== 'user') return;
  const [m] = await db.select({ team: organization.name }).from(member).innerJoin(organization, eq(organization.id, member.organizationId))
    .where(and(eq(member.userId, actor.user.id), eq(member.organizationId, teamId))).limit(1);
  if (m) throw forbidden(`You are a member of the team "${m.team}" that made this entry, so you cannot ${what} it; another moderator must.`);
}
