/**
 * Standings recomputation core: consensus + degrees of equivalence + per-entry scores + ranking
 * for 50 entries x 1,000 targets (invented data, seeded). Target: < 200 ms for the warm run (median
 * of 5: the server recomputes standings in a long-lived process); exits 1 when it is missed. The
 * first run (cold JIT) is printed beside it with its own PASS/MISS, for information. Short form
 * (BENCH_SHORT=1): the same; it takes seconds.
 * Run: node --import tsx bench/scoring.bench.ts
 */
import {
  accuracyCostFront,
  consensus,
  createRng,
  degreesOfEquivalence,
  entryAgreement,
  rankEntries,
  scoreSweep,
  type DegreeOfEquivalence,
  type Estimate,
  type SweepItem,
} from '../shared/scoring/index';

const ENTRIES = 50;
const TARGETS = 1000;
const TARGET_MS = 200;

function makeData(seed: number) {
  const rng = createRng(seed);
  const truth = Array.from({ length: TARGETS }, () => 2 * rng.uniform() - 1);
  const verifiable = Array.from({ length: TARGETS }, (_, t) => t % 2 === 0);
  const entries = Array.from({ length: ENTRIES }, (_, e) => {
    const scale = 0.002 * (1 + 10 * rng.uniform());
    const bias = e % 10 === 9 ? 0.05 : 0; // a few biased entries
    const honesty = e % 7 === 3 ? 0.3 : 1; // a few overconfident ones
    const estimates: (Estimate | undefined)[] = truth.map((r) => {
      if (rng.uniform() < 0.05) return undefined; // 5% of the grid unanswered
      const u = scale * (0.5 + rng.uniform());
      return { value: r + bias + u * rng.normal(), uncertainty: u * honesty, kind: 'statistical' };
    });
    return { id: `entry-${String(e).padStart(2, '0')}`, submittedAt: 1_700_000_000_000 + e * 1000, cost: e % 5 === 0 ? undefined : 10 ** (1 + 4 * rng.uniform()), estimates };
  });
  return { truth, verifiable, entries };
}

function recompute(data: ReturnType<typeof makeData>) {
  const { truth, verifiable, entries } = data;
  const does: DegreeOfEquivalence[][] = entries.map(() => []);
  const consensusByTarget = new Array(TARGETS);
  let disputed = 0;
  for (let t = 0; t < TARGETS; t++) {
    const who: number[] = [];
    const xs: Estimate[] = [];
    entries.forEach((en, e) => {
      const est = en.estimates[t];
      if (est) {
        who.push(e);
        xs.push(est);
      }
    });
    const c = consensus(xs); // default estimator
    consensusByTarget[t] = c;
    if (c.disputed) disputed++;
    if (!verifiable[t]) {
      const d = degreesOfEquivalence(xs, c);
      d.forEach((x, k) => does[who[k]].push(x));
    }
  }
  const rows = entries.map((en, e) => {
    const items: SweepItem[] = truth.map((r, t) => ({
      targetId: String(t),
      estimate: en.estimates[t],
      reference: verifiable[t] ? { value: r } : undefined,
      consensus: verifiable[t] ? undefined : { value: consensusByTarget[t].value, uncertainty: consensusByTarget[t].uncertainty },
    }));
    const s = scoreSweep(items);
    const a = entryAgreement(does[e]);
    return { id: en.id, submittedAt: en.submittedAt, cost: en.cost, metrics: { rmseVerifiable: s.verifiable.rmse, agreementMedianRatio: a.medianRatio, exceed: a.exceedCount } };
  });
  const ranked = rankEntries(rows);
  const front = accuracyCostFront(rows.map((r) => ({ id: r.id, error: r.metrics.rmseVerifiable, cost: r.cost })));
  return { ranked, front, disputed };
}

const data = makeData(20261201);
const t0 = performance.now();
const first = recompute(data);
const cold = performance.now() - t0;
const times: number[] = [];
for (let i = 0; i < 5; i++) {
  const s = performance.now();
  recompute(data);
  times.push(performance.now() - s);
}
times.sort((a, b) => a - b);
const warm = times[2];
console.log(`scoring: ${ENTRIES} entries x ${TARGETS} targets (default estimator, LCS greedy above 20)`);
console.log(`  disputed targets: ${first.disputed}; front: ${first.front.front.length} entries; top: ${first.ranked[0].entry.id}`);
console.log(`  cold ${cold.toFixed(1)} ms, warm median of 5 ${warm.toFixed(1)} ms (target < ${TARGET_MS} ms)`);
console.log(`  ${cold < TARGET_MS ? 'PASS' : 'MISS'} cold, ${warm < TARGET_MS ? 'PASS' : 'MISS'} warm`);
if (warm >= TARGET_MS) process.exitCode = 1;
