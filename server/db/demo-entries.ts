/**
 * Demo entries. EVERY NUMBER HERE IS INVENTED for the demo scenario: each value is the exact
 * reference (or, where none exists, a truncated-propagation stand-in at a tight threshold) plus
 * made-up errors of a kind each invented team might plausibly have. Nothing here is a measurement.
 */
import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { createRng } from '@shared/scoring/prng';
import type { Db } from './client';
import { challengeVersions, entries, estimates, organization, references, targets, instances } from './schema';
import { runCompute } from '../jobs/run-compute';
import type { JobHandler } from '../jobs/types';
import { enqueueJob } from '../jobs/queue';
import { recordAudit } from '../services/record-audit';

type Est = { targetKey: string; value: number; uncertainty: number; kind: string; raw: Record<string, unknown> | null };

const clamp = (x: number) => Math.max(-1, Math.min(1, x));
const round = (x: number, d = 5) => Math.round(x * 10 ** d) / 10 ** d;

async function truths(db: Db, versionId: string, spec: unknown) {
  const rows = await db.select({ key: targets.key, value: references.value, steps: instances.params })
    .from(targets).innerJoin(instances, eq(instances.id, targets.instanceId)).leftJoin(references, eq(references.targetId, targets.id))
    .where(eq(targets.versionId, versionId)).orderBy(targets.key);
  const missing = rows.filter((r) => r.value === null || r.value === undefined).map((r) => r.key);
  const standIn = new Map<string, number>();
  if (missing.length) {
    await runCompute({ mode: 'baseline', spec, targetIds: missing, baseline: { delta: 5e-4, maxTerms: 100_000 } }, (m) => {
      if (m.type === 'baseline') standIn.set(m.targetId, m.value);
    });
  }
  return rows.map((r) => ({ key: r.key, steps: (r.steps as { steps?: number }).steps ?? 1, truth: r.value ?? standIn.get(r.key) ?? 0, exact: r.value !== null && r.value !== undefined }));
}

function hardware(ts: Awaited<ReturnType<typeof truths>>, seed: number): Est[] {
  const rng = createRng(seed);
  const scales = [1, 1.5, 2, 3];
  return ts.map((t) => {
    const gamma = 0.035 * t.steps; // invented decay per unit noise scale
    const shotsSigma = 0.012;
    const noisy = scales.map((c) => ({ scale: c, value: round(t.truth * Math.exp(-gamma * c) + shotsSigma * rng.normal()), uncertainty: shotsSigma, shots: 4096 }));
    // the invented team extrapolates with a weighted linear fit in c (its stated model)
    const w = noisy.map(() => 1 / shotsSigma ** 2);
    const sw = w.reduce((a, b) => a + b, 0);
    const mx = noisy.reduce((a, p, i) => a + w[i] * p.scale, 0) / sw;
    const my = noisy.reduce((a, p, i) => a + w[i] * p.value, 0) / sw;
    const sxx = noisy.reduce((a, p, i) => a + w[i] * (p.scale - mx) ** 2, 0);
    const slope = noisy.reduce((a, p, i) => a + w[i] * (p.scale - mx) * (p.value - my), 0) / sxx;
    const e0 = my - slope * mx;
    const u0 = Math.sqrt(1 / sw + (mx * mx) / sxx);
    return { targetKey: t.key, value: round(clamp(e0)), uncertainty: round(u0, 6), kind: 'statistical', raw: { unmitigated: noisy[0].value, noiseScaled: noisy } };
  });
}

function tensorNetwork(ts: Awaited<ReturnType<typeof truths>>, seed: number, chiMax: number): Est[] {
  const rng = createRng(seed);
  return ts.map((t) => {
    const err = 0.002 * Math.exp(t.steps / 5) * (128 / chiMax); // invented: grows with depth, shrinks with bond dimension
    const chis = [16, 32, 64, chiMax];
    const trace = chis.map((chi) => ({ parameter: chi, value: round(t.truth + err * (chiMax / chi) * (0.5 + rng.uniform())), cost: round(0.02 * (chi / 16) ** 3, 4) }));
    const final = trace[trace.length - 1].value;
    return { targetKey: t.key, value: round(clamp(final)), uncertainty: round(Math.abs(final - trace[trace.length - 2].value) + 1e-4, 6), kind: 'systematic', raw: { convergence: trace } };
  });
}

function propagation(ts: Awaited<ReturnType<typeof truths>>, seed: number): Est[] {
  const rng = createRng(seed);
  return ts.map((t) => {
    const bound = 1e-4 * 2 ** Math.min(t.steps, 12) / 8; // invented truncation weight
    return { targetKey: t.key, value: round(clamp(t.truth + bound * 0.4 * rng.normal()), 6), uncertainty: round(bound, 7), kind: 'bound', raw: null };
  });
}

interface DemoEntry { team: string; state: 'published' | 'in-review'; track: 'hardware' | 'classical'; family: string; label: string; document: Record<string, unknown>; estimates: Est[] }

async function insertEntry(db: Db, slug: string, versionId: string, e: DemoEntry, at: Date) {
  const [team] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, e.team));
  if (!team) return;
  await db.transaction(async (tx) => {
    const id = randomUUID();
    await tx.insert(entries).values({
      id, lineageId: id, challengeSlug: slug, versionId, teamId: team.id, state: e.state, track: e.track, methodFamily: e.family, label: e.label,
      document: { ...e.document, demo: 'invented demo data' }, submittedAt: at, publishedAt: e.state === 'published' ? at : null, createdAt: at,
    });
    for (let i = 0; i < e.estimates.length; i += 1000) await tx.insert(estimates).values(e.estimates.slice(i, i + 1000).map((x) => ({ ...x, entryId: id })));
    await recordAudit(tx, { actor: { kind: 'system', label: 'seed' }, action: e.state === 'published' ? 'entry.publish' : 'entry.submit', subjectType: 'entry', subjectId: id, details: { demo: true } });
  });
}

/** The invented demo entries of a demo challenge version, made from its computed references. */
export const demoEntriesJob: JobHandler = async (job, w) => {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const [v] = await w.db.select().from(challengeVersions).where(eq(challengeVersions.id, versionId));
  if (!v) throw new Error('no such version');
  const [has] = await w.db.select({ id: entries.id }).from(entries).where(and(eq(entries.versionId, versionId), eq(entries.isBaseline, false))).limit(1);
  if (has) return { skipped: 'entries exist' };
  await w.progress(0.1, 'computing stand-in values for targets without exact references');
  const ts = await truths(w.db, versionId, v.spec);
  const seed = [...v.challengeSlug].reduce((a, ch) => a * 31 + ch.charCodeAt(0), 7) >>> 0;
  const day = 86400_000;
  const base = w.now().getTime() - 20 * day;
  const list: DemoEntry[] = [
    { team: 'cobalt-qubit-lab', state: 'published', track: 'hardware', family: 'error-mitigated-hardware', label: 'Juniper-156, ZNE (linear, 4 scales)',
      document: { method: { family: 'error-mitigated-hardware', settings: { noiseScaleFactors: [1, 1.5, 2, 3], extrapolation: 'weighted linear', amplification: 'gate folding', shots: 4096, twirls: 32 } }, resources: { qpuSeconds: 5400, qubitsUsed: 68, device: 'Juniper-156 (fictional)', hardware: 'fictional superconducting device' }, license: 'CC-BY-4.0' },
      estimates: hardware(ts, seed + 1) },
    { team: 'lattice-ledger', state: 'published', track: 'classical', family: 'tensor-network', label: 'BP-gauged PEPS, chi = 128',
      document: { method: { family: 'tensor-network', settings: { bondDimension: 128, gauge: 'belief propagation', contraction: 'boundary MPS' } }, resources: { cpuCoreHours: 310, memoryGiB: 96, wallTimeSeconds: 14400, software: [{ name: 'ledger-tn', version: '2.3' }] }, links: { code: 'https://example.org/lattice-ledger/code' }, license: 'CC-BY-4.0' },
      estimates: tensorNetwork(ts, seed + 2, 128) },
    { team: 'heisenberg-sprint', state: 'published', track: 'classical', family: 'pauli-propagation', label: 'Sparse Pauli dynamics, delta = 1e-5',
      document: { method: { family: 'pauli-propagation', settings: { coefficientThreshold: 1e-5, maxWeight: 12 } }, resources: { cpuCoreHours: 42, memoryGiB: 48, wallTimeSeconds: 3000, software: [{ name: 'sprint-pauli', version: '0.9' }] }, license: 'CC-BY-4.0' },
      estimates: propagation(ts, seed + 3) },
    { team: 'lattice-ledger', state: 'in-review', track: 'classical', family: 'tensor-network', label: 'BP-gauged PEPS, chi = 256',
      document: { method: { family: 'tensor-network', settings: { bondDimension: 256, gauge: 'belief propagation' } }, resources: { cpuCoreHours: 2400, memoryGiB: 380 }, license: 'CC-BY-4.0' },
      estimates: tensorNetwork(ts, seed + 4, 256).filter((_, i) => i % 3 !== 2) },
  ];
  let n = 0;
  for (const e of list) await insertEntry(w.db, v.challengeSlug, versionId, e, new Date(base + (n++) * 3 * day));
  await enqueueJob(w.db, 'standings', { versionId }, `standings:${versionId}`);
  return { entries: list.length, targets: ts.length, standIns: ts.filter((t) => !t.exact).length };
};
