/**
 * Demo entries. EVERY NUMBER HERE IS INVENTED for the demo scenario: each value is the exact
 * reference (or, where none exists, a truncated-propagation stand-in at a tight threshold) plus
 * made-up errors of a kind each invented team might plausibly have. Nothing here is a measurement.
 */
import { and, eq } from 'drizzle-orm';
import { createRng } from '@shared/scoring/prng';
import type { Db } from './client';
import { challengeVersions, entries, observables, organization, references, targets, instances } from './schema';
import { runCompute } from '../jobs/run-compute';
import type { JobHandler } from '../jobs/types';
import { createSystemEntry } from '../services/create-system-entry';
import type { Effect } from '../effects';
import type { MethodFamily, Track } from '@shared/vocabulary';

/**
 * Truncated propagation settings for the stand-in values where no exact reference exists (tighter
 * than the house baseline, loose enough that the seed's background work stays short).
 */
const STAND_IN = { delta: 2e-3, maxTerms: 10_000 };

type Est = { targetKey: string; value: number; uncertainty: number; kind: string; raw: Record<string, unknown> | null };

/** an estimate stays within the observable's physical bound (the sum of |coef|) */
const clampTo = (x: number, bound: number) => Math.max(-bound, Math.min(bound, x));
const round = (x: number, d = 5) => Math.round(x * 10 ** d) / 10 ** d;

async function truths(db: Db, versionId: string, spec: unknown) {
  const rows = await db.select({ key: targets.key, value: references.value, steps: instances.params, bound: observables.bound })
    .from(targets).innerJoin(instances, eq(instances.id, targets.instanceId)).innerJoin(observables, eq(observables.id, targets.observableId)).leftJoin(references, eq(references.targetId, targets.id))
    .where(eq(targets.versionId, versionId)).orderBy(targets.key);
  const missing = rows.filter((r) => r.value === null || r.value === undefined).map((r) => r.key);
  const standIn = new Map<string, number>();
  if (missing.length) {
    await runCompute({ mode: 'baseline', spec, targetIds: missing, baseline: STAND_IN }, (m) => {
      if (m.type === 'baseline') standIn.set(m.targetId, m.value);
    });
  }
  return rows.map((r) => ({ key: r.key, steps: (r.steps as { steps?: number }).steps ?? 1, bound: r.bound, truth: r.value ?? standIn.get(r.key) ?? 0, exact: r.value !== null && r.value !== undefined }));
}

function hardware(ts: Awaited<ReturnType<typeof truths>>, seed: number): Est[] {
  const rng = createRng(seed);
  const scales = [1, 2, 3];
  return ts.map((t) => {
    const gamma = 0.028 * t.steps; // invented decay per unit noise scale
    const shotsSigma = 0.01;
    const noisy = scales.map((c) => ({ scale: c, value: round(t.truth * Math.exp(-gamma * c) + shotsSigma * rng.normal()), uncertainty: shotsSigma, shots: 8192 }));
    // the invented team extrapolates with a weighted linear fit in c (its stated model)
    const w = noisy.map(() => 1 / shotsSigma ** 2);
    const sw = w.reduce((a, b) => a + b, 0);
    const mx = noisy.reduce((a, p, i) => a + w[i] * p.scale, 0) / sw;
    const my = noisy.reduce((a, p, i) => a + w[i] * p.value, 0) / sw;
    const sxx = noisy.reduce((a, p, i) => a + w[i] * (p.scale - mx) ** 2, 0);
    const slope = noisy.reduce((a, p, i) => a + w[i] * (p.scale - mx) * (p.value - my), 0) / sxx;
    const e0 = my - slope * mx;
    const u0 = Math.sqrt(1 / sw + (mx * mx) / sxx);
    return { targetKey: t.key, value: round(clampTo(e0, t.bound)), uncertainty: round(u0, 6), kind: 'statistical', raw: { unmitigated: noisy[0].value, noiseScaled: noisy } };
  });
}

function snakeMps(ts: Awaited<ReturnType<typeof truths>>, seed: number, chiMax: number, twoD: boolean): Est[] {
  const rng = createRng(seed);
  return ts.map((t) => {
    // invented: the truncation error grows with depth (much faster on a 2D lattice in a snake ordering) and shrinks with chi
    const err = 0.0015 * Math.exp(t.steps / (twoD ? 3.5 : 6)) * (256 / chiMax);
    const chis = [32, 64, 128, chiMax];
    const trace = chis.map((chi) => ({ parameter: chi, value: round(t.truth + Math.min(0.5, err * (chiMax / chi)) * (0.5 + rng.uniform())), cost: round(0.01 * (chi / 32) ** 3, 4) }));
    const final = trace[trace.length - 1].value;
    return { targetKey: t.key, value: round(clampTo(final, t.bound)), uncertainty: round(Math.abs(final - trace[trace.length - 2].value) + 1e-4, 6), kind: 'systematic', raw: { convergence: trace } };
  });
}

function neuralState(ts: Awaited<ReturnType<typeof truths>>, seed: number): Est[] {
  const rng = createRng(seed);
  return ts.map((t) => {
    // invented: Monte Carlo sampling noise plus a variational bias that grows with the number of time steps
    const sampling = 0.004 * t.bound;
    const bias = 0.002 * t.steps * t.bound * (rng.uniform() - 0.3);
    return { targetKey: t.key, value: round(clampTo(t.truth + bias + sampling * rng.normal(), t.bound), 6), uncertainty: round(sampling * Math.sqrt(1 + t.steps / 4), 7), kind: 'statistical', raw: null };
  });
}

interface DemoEntry { team: string; state: 'published' | 'in-review'; track: Track; family: MethodFamily; label: string; document: Record<string, unknown>; estimates: Est[] }

/** Stored through the service that owns system entries (entry, estimates, audit line, standings job). */
async function insertEntry(db: Db, slug: string, versionId: string, e: DemoEntry, at: Date): Promise<Effect[]> {
  const [team] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, e.team));
  if (!team) return [];
  const { effects } = await createSystemEntry(db, {
    slug, versionId, teamId: team.id, state: e.state, track: e.track, methodFamily: e.family, label: e.label,
    document: { ...e.document, demo: 'invented demo data' }, estimates: e.estimates, actorLabel: 'seed', auditDetails: { demo: true }, at,
  });
  return effects;
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
  // the entries follow the challenge's opening (the version's publication), a few days apart
  const opened = (v.publishedAt ?? w.now()).getTime();
  const spec = v.spec as { lattice: { kind: string; n?: number; rows?: number; cols?: number } };
  const qubits = spec.lattice.n ?? (spec.lattice.rows ?? 1) * (spec.lattice.cols ?? 1);
  const twoD = v.challengeSlug.includes('square');
  const list: DemoEntry[] = [
    { team: 'cobalt-qubit-lab', state: 'published', track: 'hardware', family: 'error-mitigated-hardware', label: 'Marram array, ZNE (linear, 3 scales)',
      document: { method: { family: 'error-mitigated-hardware', settings: { noiseScaleFactors: [1, 2, 3], extrapolation: 'weighted linear', amplification: 'pulse stretching', shots: 8192, twirls: 24 } }, resources: { qpuSeconds: 3600 + 40 * qubits, qubitsUsed: qubits, device: 'Marram (fictional superconducting array)', hardware: 'fictional superconducting array' }, license: 'CC-BY-4.0' },
      estimates: hardware(ts, seed + 1) },
    { team: 'lattice-ledger', state: 'published', track: 'classical', family: 'tensor-network', label: 'Snake-ordered MPS + TEBD, chi = 256',
      document: { method: { family: 'tensor-network', settings: { bondDimension: 256, ordering: 'snake', evolution: 'TEBD', truncation: 'singular values below 1e-10' } }, resources: { cpuCoreHours: 180, memoryGiB: 64, wallTimeSeconds: 9000, software: [{ name: 'ledger-mps', version: '1.4' }] }, links: { code: 'https://example.org/lattice-ledger/code' }, license: 'CC-BY-4.0' },
      estimates: snakeMps(ts, seed + 2, 256, twoD) },
    { team: 'heisenberg-sprint', state: 'published', track: 'classical', family: 'neural-quantum-state', label: 'Convolutional NQS, 6 layers, 4096 samples',
      document: { method: { family: 'neural-quantum-state', settings: { architecture: 'convolutional', layers: 6, samples: 4096, integrator: 'variational, second order' } }, resources: { gpuHours: 36, memoryGiB: 40, wallTimeSeconds: 5400, software: [{ name: 'sprint-nqs', version: '0.7' }] }, license: 'CC-BY-4.0' },
      estimates: neuralState(ts, seed + 3) },
    { team: 'lattice-ledger', state: 'in-review', track: 'classical', family: 'tensor-network', label: 'Snake-ordered MPS + TEBD, chi = 1024',
      document: { method: { family: 'tensor-network', settings: { bondDimension: 1024, ordering: 'snake', evolution: 'TEBD' } }, resources: { cpuCoreHours: 2100, memoryGiB: 310 }, license: 'CC-BY-4.0' },
      estimates: snakeMps(ts, seed + 4, 1024, twoD).filter((_, i) => i % 3 !== 2) },
  ];
  let n = 0;
  const effects: Effect[] = [];
  for (const e of list) effects.push(...await insertEntry(w.db, v.challengeSlug, versionId, e, new Date(opened + (2 + 3 * n++) * day)));
  return { entries: list.length, targets: ts.length, standIns: ts.filter((t) => !t.exact).length, effects };
};
