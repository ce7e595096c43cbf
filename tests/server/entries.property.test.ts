/**
 * RELIABILITY item 16: valid generated entries are accepted and round-trip unchanged; mutated ones
 * get 400 with a field path, never 500, and nothing is stored.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { count } from 'drizzle-orm';
import { ORIGIN } from './helpers';
import { makeEntryWorld, type EntryWorld } from './entries-fixtures';
import { entries, estimates } from '../../server/db/schema';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

const num = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true }).map((x) => (Object.is(x, -0) ? 0 : x));
const estimateArb = (target: string) => fc.record({
  target: fc.constant(target), value: num(-0.9, 0.9), uncertainty: num(0, 0.5),
  uncertaintyKind: fc.constantFrom('statistical', 'systematic', 'bound', 'none'),
  unmitigated: num(-1, 1),
  noiseScaled: fc.array(fc.record({ scale: num(1, 10), value: num(-1, 1), uncertainty: num(0, 1), shots: fc.integer({ min: 0, max: 1e9 }) }, { requiredKeys: ['scale', 'value', 'uncertainty'] }), { minLength: 1, maxLength: 4 }),
  convergence: fc.array(fc.record({ parameter: num(0, 1e4), value: num(-1, 1), cost: num(0, 1e6) }, { requiredKeys: ['parameter', 'value'] }), { minLength: 1, maxLength: 4 }),
}, { requiredKeys: ['target', 'value', 'uncertainty', 'uncertaintyKind'] });

const docArb = () => fc.subarray(w.targets.map((x) => x.key), { minLength: 1, maxLength: 20 }).chain((keys) => fc.record({
  challenge: fc.constant({ id: 'chain-12', version: 1, checksum: w.checksum }),
  track: fc.constantFrom('hardware', 'classical'),
  label: fc.string({ minLength: 1, maxLength: 120 }),
  method: fc.record({ family: fc.constantFrom('error-mitigated-hardware', 'tensor-network', 'pauli-propagation', 'other'), description: fc.string({ maxLength: 50 }), settings: fc.dictionary(fc.string({ minLength: 1, maxLength: 10 }).filter((k) => k !== '__proto__'), fc.oneof(fc.string({ maxLength: 20 }), num(-1e6, 1e6), fc.boolean(), fc.array(fc.integer({ min: -1000, max: 1000 }), { maxLength: 5 })), { maxKeys: 5 }) }, { requiredKeys: ['family'] }),
  resources: fc.record({ wallTimeSeconds: num(0, 1e6), gpuHours: num(0, 100), hardware: fc.string({ maxLength: 30 }), software: fc.array(fc.record({ name: fc.string({ minLength: 1, maxLength: 10 }), version: fc.string({ maxLength: 10 }) }), { maxLength: 3 }) }, { requiredKeys: [] }),
  license: fc.constantFrom('CC-BY-4.0', 'MIT'),
  notes: fc.string({ maxLength: 200 }),
  estimates: fc.tuple(...keys.map(estimateArb)),
}, { requiredKeys: ['challenge', 'track', 'label', 'method', 'estimates'] }));

const stored = async () => [(await w.t.database.db.select({ n: count() }).from(entries))[0].n, (await w.t.database.db.select({ n: count() }).from(estimates))[0].n];
const post = (text: string) => w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(text);

type Mutation = (d: any) => void;
const MUTATIONS: [string, Mutation][] = [
  ['drop a required field', (d) => { delete d[['challenge', 'track', 'label', 'method', 'estimates'][d.estimates.length % 5]]; }],
  ['value as a string', (d) => { d.estimates[0].value = String(d.estimates[0].value); }],
  ['negative uncertainty', (d) => { d.estimates[0].uncertainty = -1 - d.estimates[0].uncertainty; }],
  ['unknown target', (d) => { d.estimates[0].target = 'nope:z0'; }],
  ['duplicate target', (d) => { d.estimates.push({ ...d.estimates[0] }); }],
  ['unknown field', (d) => { d.estimates[0].state = 'published'; }],
  ['wrong kind', (d) => { d.estimates[0].uncertaintyKind = 'sigma'; }],
  ['wrong checksum', (d) => { d.challenge.checksum = 'f'.repeat(64); }],
  ['out of bounds', (d) => { d.estimates[0].value = 2; d.estimates[0].uncertainty = 0.1; }],
  ['track as a number', (d) => { d.track = 1; }],
  ['null estimates', (d) => { d.estimates = null; }],
];

describe('entries, property-based', () => {
  it('valid generated entries are accepted and round-trip unchanged', async () => {
    await fc.assert(fc.asyncProperty(docArb(), async (doc) => {
      const r = await post(JSON.stringify(doc));
      expect(r.status, r.text).toBe(201);
      const g = await w.memberA.get(`/api/entries/${r.body.id}`);
      expect(g.body.document).toEqual(doc);
    }), { numRuns: 25 });
  }, 120_000);

  it('mutated entries get 400 with a field path, never 500, and nothing is stored', async () => {
    await fc.assert(fc.asyncProperty(docArb(), fc.integer({ min: 0, max: MUTATIONS.length - 1 }), async (doc, m) => {
      const bad = structuredClone(doc);
      MUTATIONS[m][1](bad);
      const before = await stored();
      const r = await post(JSON.stringify(bad));
      expect(r.status, `${MUTATIONS[m][0]}: ${r.text}`).toBe(400);
      expect(r.body.error.problems.length).toBeGreaterThan(0);
      expect(r.body.error.problems[0].path, MUTATIONS[m][0]).toMatch(/^\/[a-zA-Z]/);
      expect(await stored()).toEqual(before);
    }), { numRuns: 60 });
  }, 120_000);
});
