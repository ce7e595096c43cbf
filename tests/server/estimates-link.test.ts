/**
 * Estimates keep their entry through statement-level triggers (drizzle/0009), not a foreign key:
 * the rules a foreign key with ON DELETE CASCADE gave must still hold, on PGlite and on PostgreSQL.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import type { Database } from '../../server/db/client';
import { entries, estimates, organization } from '../../server/db/schema';
import { createChallengeVersion } from '../../server/services/create-challenge-version';
import { publishChallengeVersion } from '../../server/services/publish-challenge-version';
import { checkEntry, parseEntryDocument } from '../../server/services/validate-entry';
import { createEntry, insertEstimates } from '../../server/services/create-entry';
import { deleteDraft } from '../../server/services/delete-entry';
import { openTestDatabase } from './helpers';

const spec = {
  id: 'link-chain', version: 1, title: 'Link chain', description: 'four sites', lattice: { kind: 'chain', n: 4 },
  circuit: { family: 'kicked-ising', steps: [1], thetaH: [0.3] }, observables: [0, 1, 2, 3].map((q) => ({ id: `z${q}`, pauli: `Z${q}` })),
};
const actor = { kind: 'system' as const, label: 'test' };
const MISSING = '00000000-0000-4000-8000-000000000009';

let database: Database;
let checksum = '';
beforeAll(async () => {
  database = await openTestDatabase();
  const v = await createChallengeVersion(database.db, spec, actor, new Date());
  checksum = v.checksum;
  await publishChallengeVersion(database.db, { slug: spec.id, actor, now: new Date() });
  await database.db.insert(organization).values({ id: 'link-team', name: 'Link team', slug: 'link-team' });
});
afterAll(async () => database?.close());

async function newEntry(label: string): Promise<string> {
  const doc = parseEntryDocument({
    challenge: { id: spec.id, version: 1, checksum: `sha256:${checksum}` }, track: 'classical', label,
    method: { family: 'tensor-network', settings: {} },
    estimates: ['z0', 'z1', 'z2', 'z3'].map((k) => ({ target: `t1-h0.300000:${k}`, value: 0.5, uncertainty: 0.01, uncertaintyKind: 'statistical' })),
  });
  const check = await checkEntry(database.db, doc);
  const e = await createEntry(database.db, { check, teamId: 'link-team', actor, now: new Date() });
  return e.id;
}
/** The database's own error under drizzle's wrapper: a foreign_key_violation (23503) from the trigger. */
async function refusedByLink(p: Promise<unknown>) {
  const e = await p.then(() => null, (x: unknown) => x as { cause?: { code?: string; message?: string } });
  expect(e, 'the statement was refused').not.toBeNull();
  expect(e!.cause?.code).toBe('23503');
  expect(e!.cause?.message).toMatch(/entry_id is not an entry/);
}
const count = async (id: string) => (await database.db.select().from(estimates).where(eq(estimates.entryId, id))).length;

describe('estimates and their entry (statement-level triggers instead of a foreign key)', () => {
  it('an entry is stored with its estimates', async () => {
    const id = await newEntry('stored');
    expect(await count(id)).toBe(4);
  });

  it('an estimate naming no entry is refused, alone or in a batch with real ones, and nothing of the statement stays', async () => {
    const id = await newEntry('batch');
    const est = { target: 't1-h0.300000:z0', value: 1, uncertainty: 0, uncertaintyKind: 'none' as const };
    await refusedByLink(insertEstimates(database.db, MISSING, [est]));
    await refusedByLink(database.db.execute(sql`insert into estimates (entry_id, target_key, value, uncertainty, kind)
      values (${id}::uuid, 'a', 1, 0, 'none'), (${MISSING}::uuid, 'b', 1, 0, 'none')`));
    expect(await count(id)).toBe(4);
    expect(await count(MISSING)).toBe(0);
  });

  it('moving estimates to an entry that does not exist is refused', async () => {
    const id = await newEntry('move');
    await refusedByLink(database.db.update(estimates).set({ entryId: MISSING }).where(eq(estimates.entryId, id)));
    expect(await count(id)).toBe(4);
  });

  it('deleting entries deletes their estimates (one entry, and several in one statement), and no other', async () => {
    const keep = await newEntry('keep');
    const a = await newEntry('a');
    const b = await newEntry('b');
    const c = await newEntry('c');
    await database.db.delete(entries).where(eq(entries.id, a));
    expect(await count(a)).toBe(0);
    await database.db.execute(sql`delete from entries where id in (${b}::uuid, ${c}::uuid)`);
    expect(await count(b)).toBe(0);
    expect(await count(c)).toBe(0);
    expect(await count(keep)).toBe(4);
  });

  it('deleting a draft through its service leaves no estimates behind', async () => {
    const id = await newEntry('service');
    expect(await deleteDraft(database.db, { entryId: id, actor, now: new Date() })).toEqual({ id, deleted: true });
    expect((await database.db.select().from(entries).where(eq(entries.id, id))).length).toBe(0);
    expect(await count(id)).toBe(0);
  });
});
