/**
 * A moderator's challenge settings: consensus estimator, primary ranking metric, tracks,
 * submission window, licence, and whether the challenge is open or closed. Merged into
 * challenges.settings (fields not sent keep their value); audit 'challenge.settings' with the
 * before and after; the standings are recomputed (the estimator changes the consensus).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { challenges } from '../db/schema';
import { conflict, notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { kickJobs, type WithEffects } from '../effects';

export interface SettingsPatch {
  estimator?: string;
  primaryMetric?: string;
  tracks?: string[];
  submissionWindow?: { opensAt?: string | null; closesAt?: string | null } | null;
  license?: string;
  state?: 'open' | 'closed';
  reason?: string;
}

export async function updateChallengeSettings(db: Db, p: { slug: string; patch: SettingsPatch; actor: AuditActor; now: Date }) {
  const result = await db.transaction(async (tx) => {
    const [c] = await tx.select().from(challenges).where(eq(challenges.slug, p.slug)).for('update');
    if (!c) throw notFound(`The challenge "${p.slug}"`);
    const { state, reason, ...rest } = p.patch;
    if (state && c.state === 'draft') throw conflict(`"${p.slug}" has no published version yet; publish one before opening or closing it.`);
    const before = { ...(c.settings as Record<string, unknown>), state: c.state };
    const settings: Record<string, unknown> = { ...(c.settings as Record<string, unknown>) };
    for (const [k, v] of Object.entries(rest)) if (v !== undefined) settings[k] = v;
    if (rest.submissionWindow === null) delete settings.submissionWindow;
    const after = { ...settings, state: state ?? c.state };
    await tx.update(challenges).set({ settings, state: state ?? c.state, updatedAt: p.now }).where(eq(challenges.slug, p.slug));
    const changed = Object.keys(after).filter((k) => JSON.stringify((before as Record<string, unknown>)[k]) !== JSON.stringify((after as Record<string, unknown>)[k]));
    await recordAudit(tx, {
      actor: p.actor, action: 'challenge.settings', subjectType: 'challenge', subjectId: p.slug, at: p.now,
      details: { before, after, changed, reason: reason ?? (changed.length ? `changed ${changed.join(', ')}` : 'no change') },
    });
    const jobId = c.currentVersionId ? await enqueueJob(tx, 'standings', { versionId: c.currentVersionId }, `standings:${c.currentVersionId}`) : null;
    return { slug: p.slug, state: after.state, settings, changed, jobId };
  });
  return { result, effects: result.jobId ? [kickJobs()] : [] } satisfies WithEffects<typeof result>;
}
