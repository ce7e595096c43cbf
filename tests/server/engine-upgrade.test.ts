/**
 * The stability policy on the server (server/jobs/engine-upgrade.ts, run at boot): references made
 * by an older engine are recomputed in place, the standings rescored, and the public history gets
 * one event "Reference engine X -> Y" per affected version; without a version change nothing
 * happens and no event is written. Standings recomputations are "standings" events, not engine
 * changes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, asc, eq, ne } from 'drizzle-orm';
import { ENGINE_VERSION } from '../../shared/physics/reference';
import { agent } from './helpers';
import { makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';
import { auditLog, entries, estimates, references, standings, targets } from '../../server/db/schema';
import { enqueueJob } from '../../server/jobs/queue';
import { ENGINE_CHANGE, upgradeEngine } from '../../server/jobs/engine-upgrade';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 180_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

const OLD = 'parallax-engine 0.0.9 (test)';
const refs = async () => (await w.t.database.db.select({ key: targets.key, value: references.value, method: references.method, engine: references.engineVersion })
  .from(references).innerJoin(targets, eq(targets.id, references.targetId))).sort((a, b) => a.key.localeCompare(b.key));

describe('engine version change', () => {
  it('no version change: nothing is recomputed and no event is written', async () => {
    expect(await upgradeEngine(w.t.database.db, w.t.clock.now)).toEqual({ versions: 0, references: 0 });
    expect(await w.t.database.db.select().from(auditLog).where(eq(auditLog.action, ENGINE_CHANGE))).toEqual([]);
  });

  it('references of an older engine are recomputed, the standings rescored, one history event', async () => {
    const db = w.t.database.db;
    const before = await refs();
    expect(before.length).toBe(60);
    expect(before.every((r) => r.engine === ENGINE_VERSION)).toBe(true);
    // the stored numbers of an "older engine": wrong by 0.25, and marked with its version
    await db.update(references).set({ engineVersion: OLD }).where(ne(references.method, 'supplied'));
    for (const r of before) if (r.value !== null) await db.update(references).set({ value: r.value + 0.25 }).where(and(eq(references.engineVersion, OLD), eq(references.targetId, (await db.select({ id: targets.id }).from(targets).where(eq(targets.key, r.key)))[0].id)));
    const standingsBefore = (await db.select().from(standings)).length;

    w.t.clock.advance(60_000);
    expect(await upgradeEngine(db, w.t.clock.now)).toEqual({ versions: 1, references: 60 });
    // a restart before the recomputation finished queues it again but writes no second event
    expect(await upgradeEngine(db, w.t.clock.now)).toEqual({ versions: 1, references: 60 });
    w.worker.kick();
    await settle(w.t, w.worker);

    const after = await refs();
    expect(after.map((r) => [r.key, r.value, r.method, r.engine])).toEqual(before.map((r) => [r.key, r.value, r.method, ENGINE_VERSION]));
    expect((await db.select().from(standings)).length).toBeGreaterThan(standingsBefore);
    const events = await db.select().from(auditLog).where(eq(auditLog.action, ENGINE_CHANGE));
    expect(events).toHaveLength(1);
    expect(events[0].details).toMatchObject({ from: OLD, to: ENGINE_VERSION, references: 60, version: 1 });
    expect(events[0].at).toEqual(w.t.clock.now);
    // done: the next start finds nothing stale
    expect(await upgradeEngine(db, w.t.clock.now)).toEqual({ versions: 0, references: 0 });

    const h = await agent(w.t).get('/api/challenges/chain-12/history');
    expect(h.status).toBe(200);
    const kinds = (h.body.events as { kind: string; summary: string }[]);
    expect(kinds.filter((e) => e.kind === 'engine').map((e) => e.summary)).toEqual([`Reference engine ${OLD} -> ${ENGINE_VERSION}: 60 references recomputed, standings rescored`]);
    expect(kinds.some((e) => e.kind === 'standings')).toBe(true);
    expect(kinds.some((e) => e.kind === 'rescoring')).toBe(false);
  });
  it('the house baseline of an older engine is replaced by a new revision at the next baseline job; the old one stays as an earlier revision', async () => {
    const db = w.t.database.db;
    const baselines = async () => db.select().from(entries).where(eq(entries.isBaseline, true)).orderBy(asc(entries.revision));
    const [b] = await baselines();
    expect(b).toBeDefined();
    const doc = b.document as { resources: { software: { name: string }[] } };
    expect(doc.resources.software[0].name).toBe(ENGINE_VERSION);
    // the same engine: the job keeps it
    await enqueueJob(db, 'baseline', { versionId: b.versionId }, `baseline:${b.versionId}`);
    w.worker.kick();
    await settle(w.t, w.worker);
    expect(await baselines()).toHaveLength(1);
    // made by an "older engine": replaced
    await db.update(entries).set({ document: { ...(b.document as object), resources: { ...doc.resources, software: [{ name: OLD }] } } }).where(eq(entries.id, b.id));
    w.t.clock.advance(60_000);
    await enqueueJob(db, 'baseline', { versionId: b.versionId }, `baseline:${b.versionId}`);
    w.worker.kick();
    await settle(w.t, w.worker);
    const all = await baselines();
    expect(all.map((e) => [e.revision, e.state])).toEqual([[1, 'superseded'], [2, 'published']]);
    expect(all[1].supersedesId).toBe(b.id);
    expect(all[1].lineageId).toBe(b.lineageId);
    expect((all[1].document as typeof doc).resources.software[0].name).toBe(ENGINE_VERSION);
    const count = async (id: string) => (await db.select({ id: estimates.id }).from(estimates).where(eq(estimates.entryId, id))).length;
    expect(await count(all[1].id)).toBe(await count(b.id));
    // the standings list the new revision, not the old one
    const s = await agent(w.t).get('/api/challenges/chain-12/standings');
    expect(s.status).toBe(200);
    const ids = (s.body.entries as { id: string }[]).map((e) => e.id);
    expect(ids).toContain(all[1].id);
    expect(ids).not.toContain(b.id);
  }, 180_000);
});
