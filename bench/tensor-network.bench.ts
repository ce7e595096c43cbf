/**
 * Tensor-network contraction: the project's kernels against numpy on the same network and path,
 * the order search against random greedy restarts, and widths/times on a 106-qubit heavy-hex patch.
 * Run: node --import tsx --expose-gc bench/tensor-network.bench.ts [--heavy]
 *
 * Targets (issue 15):
 * - contraction throughput >= 1/3 of numpy's flop rate on one core (OPENBLAS_NUM_THREADS=1), on the
 *   same leaf tensors and the same pairwise path. numpy runs each step two ways (np.einsum with
 *   optimize=True on the step's subscripts, and transpose + reshape + batched matmul, i.e. zgemm)
 *   and the faster counts. Ours runs three ways side by side: the plain-JS GEMM, the WebAssembly
 *   SIMD GEMM (wasm-gemm.ts), and 'auto' (the size rule contractPair uses by default; the target
 *   applies to it). Runs are interleaved (ours, numpy, ours, numpy) because the machine is shared;
 *   the figure is best-of-runs on each side. If python3 or numpy is missing, this part is skipped
 *   and says so.
 * - the size rule: one pairwise step (permute, product, result) on each kernel over a grid of m k n
 *   and k, printed as speed-ups; WASM_GEMM_MIN_MKN in kernels.ts comes from this table.
 * - the order search's width (64 restarts + subtree reconfiguration) within 2 of the best of 64
 *   random greedy restarts (a different seed, temperature 1), on kicked-Ising light-cone networks
 *   of the demo's kinds (heavy-hex and square patches) and on the demo's own widest networks that
 *   get exact references (ring, vacancy lattice and braid challenges of server/db/demo-challenges.ts).
 * A missed target exits 1. --heavy also plans (and, when under 2^36 flops, contracts) weight-10 to
 * weight-17 observables on a 106-qubit heavy-hex patch at 5 steps.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { TN_GEMM_RATE, TN_STEP_RATE, tnSeconds } from '../shared/physics/planner/rates';
import { checkRate } from './rate-check';
import { DEMO_SPECS } from '../server/db/demo-challenges';
import { validateChallenge } from '../shared/physics/challenge';
import { Planner } from '../shared/physics/planner';
import type { PauliFactor } from '../shared/physics/circuit';
import { kickedIsing } from '../shared/physics/kicked-ising';
import { edgeColouring, heavyHex, square, type Graph } from '../shared/physics/lattices';
import { graphBall } from '../shared/physics/light-cone';
import { contractPlan, greedyTree, planTerm, rng, treeCost, type TnTermPlan } from '../shared/physics/tensor-network/index';
import { contractPair, pairLayout, setGemmKernel, WASM_GEMM_MIN_MKN, type GemmKernel, type Tensor } from '../shared/physics/tensor-network/kernels';

const HALF_PI = Math.PI / 2;
let allPass = true;
const fmtG = (flops: number, ms: number) => (flops / ms / 1e6).toFixed(2);
/** GEMM kernels compared on every network: plain JS, WebAssembly SIMD, and the rule contractPair uses. */
const KERNELS: GemmKernel[] = ['js', 'wasm', 'auto'];

function circuitOn(g: Graph, steps: number, thetaH = 0.7, thetaJ = -HALF_PI) {
  return kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps, thetaH, thetaJ });
}
function ball(g: Graph, q: number, w: number): number[] {
  let qs = [q];
  for (let r = 1; qs.length < w; r++) qs = graphBall(g.n, g.edges, [q], r);
  return qs.slice(0, w);
}

interface Case { label: string; plan: TnTermPlan }

const hh = heavyHex(3, 5); // 106 qubits
const sq = square(7, 7);
const cases: Case[] = [];
const mk = (label: string, g: Graph, steps: number, factors: PauliFactor[]) => {
  const t0 = performance.now();
  const plan = planTerm(circuitOn(g, steps), factors);
  console.log(`${label.padEnd(40)} cone ${String(plan.coneQubits).padStart(3)} qubits, ${String(plan.leaves.length).padStart(4)} tensors, width ${plan.width}, 2^${Math.log2(plan.flops).toFixed(1)} flops, ${plan.slices} slice(s), search ${(performance.now() - t0).toFixed(0)} ms`);
  cases.push({ label, plan });
};
console.log('networks (search: 64 seeded greedy restarts + subtree reconfiguration, k = 8)');
mk('heavy-hex 106q, 5 steps, Z x10', hh, 5, ball(hh, 20, 10).map((qubit) => ({ qubit, op: 'Z' })));
mk('heavy-hex 106q, 5 steps, X x3', hh, 5, ball(hh, 33, 3).map((qubit) => ({ qubit, op: 'X' })));
mk('heavy-hex 106q, 6 steps, Z x1', hh, 6, [{ qubit: 40, op: 'Z' }]);
mk('square 7x7, 3 steps, X x2', sq, 3, [{ qubit: 24, op: 'X' }, { qubit: 25, op: 'X' }]);
mk('square 7x7, 4 steps, Z x1', sq, 4, [{ qubit: 24, op: 'Z' }]);

// the demo's widest networks with exact references (one term each, on its light cone)
const demoCases: Case[] = [];
for (const [id, target] of [['ring-36-correlators', 't10-h0.250000:zstring6'], ['vacancy-square-6x6', 't6-h0.300000:zz20_21'], ['vacancy-square-6x6', 't8-h0.300000:z35'], ['braid-128', 't8-h0.400000:zz_rung10']] as const) {
  const v = validateChallenge(DEMO_SPECS.find((s) => s.id === id) as unknown);
  if (!v.ok) throw new Error(`demo challenge ${id} does not validate`);
  const planner = new Planner(v.challenge, {});
  const t = v.challenge.targets.find((x) => x.id === target);
  if (!t) throw new Error(`demo target ${id} ${target} is missing`);
  const obs = planner.observable(t.observableId);
  const sub = planner.restrict(planner.instance(t.instanceId), { id: 'term', terms: [{ coef: 1, factors: obs.terms[0].factors }] });
  const t0 = performance.now();
  const plan = planTerm(sub.circuit, sub.observable.terms[0].factors);
  const label = `demo ${id} ${target}`;
  console.log(`${label.padEnd(40)} cone ${String(plan.coneQubits).padStart(3)} qubits, ${String(plan.leaves.length).padStart(4)} tensors, width ${plan.width}, 2^${Math.log2(plan.flops).toFixed(1)} flops, ${plan.slices} slice(s), search ${(performance.now() - t0).toFixed(0)} ms`);
  demoCases.push({ label, plan });
}

// ------------------------------------------------------------------------------------------------
// order search vs the best of 64 random greedy restarts (unsliced widths on both sides)
console.log('\norder search: width vs the best of 64 random greedy restarts (seed 12345, temperature 1) [target: within 2]');
for (const { label, plan } of [...cases, ...demoCases]) {
  const legs = plan.leaves.map((t) => t.legs);
  const r = rng(12345);
  let best = Infinity;
  for (let i = 0; i < 64; i++) best = Math.min(best, treeCost(legs, plan.nLegs, greedyTree(legs, plan.nLegs, { alpha: 0.5 + r(), temperature: 1 }, r)).width);
  const ours = treeCost(legs, plan.nLegs, { nLeaves: legs.length, pairs: plan.pairs }).width;
  const ok = ours <= best + 2;
  allPass &&= ok;
  console.log(`${label.padEnd(40)} ours ${ours}, random greedy best ${best}  ${ok ? 'PASS' : 'MISS'}`);
}

// ------------------------------------------------------------------------------------------------
// throughput against numpy
const PY = String.raw`
import json, sys, time
try:
    import numpy as np
except ImportError:
    print(json.dumps({"error": "numpy missing"})); sys.exit(0)
net = json.load(open(sys.argv[1]))
letters = [chr(c) for c in range(ord('a'), ord('z') + 1)] + [chr(c) for c in range(ord('A'), ord('Z') + 1)]
leaves = []
for t in net["leaves"]:
    d = np.array(t["re"]) + 1j * np.array(t["im"])
    leaves.append((t["legs"], d.reshape((2,) * len(t["legs"])) if t["legs"] else d.reshape(())))
def run(mode):
    ts = list(leaves)
    for (a, b), summed in zip(net["pairs"], net["sumLegs"]):
        la, A = ts[a]; lb, B = ts[b]
        s = set(summed)
        batch = [l for l in la if l in lb and l not in s]
        left = [l for l in la if l not in lb]
        right = [l for l in lb if l not in la]
        out = batch + left + right
        if mode == "einsum":
            m = {}
            for l in la + lb:
                if l not in m: m[l] = letters[len(m)]
            eq = "".join(m[l] for l in la) + "," + "".join(m[l] for l in lb) + "->" + "".join(m[l] for l in out)
            C = np.einsum(eq, A, B, optimize=True)
        else:
            sm = [l for l in la if l in s]
            Ap = np.transpose(A, [la.index(l) for l in batch + left + sm]).reshape(2 ** len(batch), 2 ** len(left), 2 ** len(sm))
            Bp = np.transpose(B, [lb.index(l) for l in batch + sm + right]).reshape(2 ** len(batch), 2 ** len(sm), 2 ** len(right))
            C = np.matmul(Ap, Bp).reshape((2,) * len(out))
        ts.append((out, C))
    return complex(ts[-1][1])
res = {}
for mode in ("einsum", "matmul"):
    best = 1e99
    for _ in range(int(sys.argv[2])):
        t0 = time.perf_counter(); v = run(mode); best = min(best, time.perf_counter() - t0)
    res[mode] = {"ms": best * 1000, "re": v.real, "im": v.imag}
print(json.dumps(res))
`;
const dir = mkdtempSync(join(tmpdir(), 'parallax-tn-bench-'));
writeFileSync(join(dir, 'run.py'), PY);
const probe = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
console.log('\ncontraction throughput (real flops: 8 per complex multiply-add; one core each) [target: ours >= 1/3 of numpy]');
if (probe.status !== 0) {
  console.log('SKIPPED: python3 with numpy is not available on this machine');
} else {
  const ratios: number[] = [];
  const perKernel: Record<GemmKernel, number[]> = { js: [], wasm: [], auto: [] };
  for (const { label, plan } of cases) {
    if (plan.slices > 1 || plan.flops > 2 ** 33) continue;
    const file = join(dir, 'net.json');
    writeFileSync(file, JSON.stringify({
      leaves: plan.leaves.map((t) => ({ legs: t.legs, re: Array.from({ length: t.data.length / 2 }, (_, i) => t.data[2 * i]), im: Array.from({ length: t.data.length / 2 }, (_, i) => t.data[2 * i + 1]) })),
      pairs: plan.pairs, sumLegs: plan.sumLegs,
    }));
    const reps = plan.flops > 2 ** 30 ? 2 : 5;
    const ours: Record<GemmKernel, number> = { js: Infinity, wasm: Infinity, auto: Infinity };
    let np = { ms: Infinity, mode: '' };
    let value = 0;
    let npValue = 0;
    let kernelDiff = 0;
    for (let round = 0; round < 2; round++) {
      for (const kernel of KERNELS) {
        setGemmKernel(kernel);
        for (let i = 0; i < reps; i++) {
          const t0 = performance.now();
          const v = contractPlan(plan)[0];
          ours[kernel] = Math.min(ours[kernel], performance.now() - t0);
          if (kernel === 'js') value = v;
          else kernelDiff = Math.max(kernelDiff, Math.abs(v - value));
        }
      }
      setGemmKernel('auto');
      const r = spawnSync('python3', [join(dir, 'run.py'), file, String(reps)], { encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1' } });
      if (r.status !== 0) throw new Error(`numpy run failed: ${r.stderr}`);
      const out = JSON.parse(r.stdout) as Record<string, { ms: number; re: number }>;
      for (const [mode, x] of Object.entries(out)) {
        if (x.ms < np.ms) np = { ms: x.ms, mode };
        npValue = x.re;
      }
    }
    const flops = plan.flops;
    // our rate / numpy's rate on the same flops, per kernel choice
    const ratio = (k: GemmKernel) => np.ms / ours[k];
    ratios.push(ratio('auto'));
    const ok = ratio('auto') >= 1 / 3;
    allPass &&= ok;
    const agree = Math.abs(value - npValue);
    console.log(`${label.padEnd(40)} numpy ${np.mode} ${np.ms.toFixed(1)} ms (${fmtG(flops, np.ms)} GFlop/s); |value diff| to numpy ${agree.toExponential(1)}, js to wasm ${kernelDiff.toExponential(1)}  ${ok ? 'PASS' : 'MISS'}`);
    for (const k of KERNELS) console.log(`  ${k.padEnd(5)} ${ours[k].toFixed(1).padStart(7)} ms  ${fmtG(flops, ours[k]).padStart(6)} GFlop/s  ratio to numpy ${ratio(k).toFixed(2)}`);
    for (const k of KERNELS) perKernel[k].push(ratio(k));
    if (agree > 1e-10 || kernelDiff > 1e-10) {
      allPass = false;
      console.log('  MISMATCH with numpy or between the kernels');
    }
  }
  if (ratios.length) {
    for (const k of KERNELS) console.log(`throughput ratios (ours / numpy), ${k} kernel: ${perKernel[k].map((r) => r.toFixed(2)).join(', ')}`);
  }
}

// ------------------------------------------------------------------------------------------------
// where the wasm GEMM pays: one pairwise step (permute + product + result) on each kernel, by size
console.log('\nsize rule: one pairwise contraction (permute, product, result), JS vs wasm kernel, best of interleaved runs');
console.log(`rule in use (kernels.ts useWasmGemm): wasm when k >= 2 and m k n >= ${WASM_GEMM_MIN_MKN}`);
{
  const r = rng(99);
  const stepTensor = (legs: number[]): Tensor => ({ legs, data: Float64Array.from({ length: 2 << legs.length }, () => r() - 0.5) });
  for (const lk of [0, 1, 2, 3, 6]) {
    const row: string[] = [];
    for (let lmn = 0; lmn <= 12; lmn += 2) {
      const lm = lmn >> 1, ln = lmn - lm;
      let id = 0;
      const ids = (c: number) => Array.from({ length: c }, () => id++);
      const left = ids(lm), sum = ids(lk), right = ids(ln);
      // summed legs first in both operands: the permute has real work to do
      const A = stepTensor([...sum, ...left]), B = stepTensor([...sum, ...right]);
      const L = pairLayout(A.legs, B.legs, () => true);
      const mkn = 2 ** (lm + lk + ln);
      const reps = Math.max(3, Math.round(2e6 / mkn));
      const t = { js: Infinity, wasm: Infinity };
      for (let round = 0; round < 5; round++) {
        for (const k of ['js', 'wasm'] as const) {
          setGemmKernel(k);
          const t0 = performance.now();
          for (let i = 0; i < reps; i++) contractPair(A, B, L);
          t[k] = Math.min(t[k], (performance.now() - t0) / reps);
        }
      }
      setGemmKernel('auto');
      row.push(`mkn 2^${lm + lk + ln} x${(t.js / t.wasm).toFixed(2)}`);
    }
    console.log(`k = ${String(2 ** lk).padEnd(3)} wasm speed-up (JS time / wasm time): ${row.join(', ')}`);
  }
}

// ------------------------------------------------------------------------------------------------
if (process.argv.includes('--heavy')) {
  console.log('\n106-qubit heavy-hex patch, 5 steps, thetaH 0.7: weight-10 to weight-17 observables (Z and mixed)');
  const c = circuitOn(hh, 5);
  for (const w of [10, 13, 17]) {
    for (const op of ['Z', 'X'] as const) {
      const qs = ball(hh, 20, w);
      const factors: PauliFactor[] = qs.map((qubit, i) => ({ qubit, op: op === 'Z' ? 'Z' : (['X', 'Y', 'Z'] as const)[i % 3] }));
      const t0 = performance.now();
      const plan = planTerm(c, factors);
      const ts = performance.now() - t0;
      let line = `weight ${w} ${op === 'Z' ? 'Z-only' : 'X/Y/Z'}: cone ${plan.coneQubits}, width ${plan.width}, 2^${Math.log2(plan.flops).toFixed(1)} flops, ${plan.slices} slices, ${(plan.memoryBytes / 2 ** 20).toFixed(0)} MiB, search ${(ts / 1000).toFixed(1)} s`;
      if (plan.flops <= 2 ** 36) {
        const t1 = performance.now();
        const v = contractPlan(plan)[0];
        line += `, contraction ${((performance.now() - t1) / 1000).toFixed(1)} s, value ${v.toPrecision(6)}`;
      } else line += ', not contracted (over 2^36 flops)';
      console.log(line);
    }
  }
}

// ------------------------------------------------------------------------------------------------
// Planner calibration (shared/physics/planner/rates.ts TN_GEMM_RATE, TN_STEP_RATE): the default
// contraction (contractPlan as the runner calls it) on kicked-Ising light-cone networks of 2^20 to
// 2^34 flops (best of 2 or 3), the two constants of tnSeconds fitted by least squares on relative
// error, each checked against its constant; and the model with the constants in use against every
// network.
{
  const calib: { label: string; plan: TnTermPlan }[] = [];
  const sq6 = square(6, 6);
  const pick = (label: string, g: Graph, steps: number, q: number, w: number) => {
    const factors: PauliFactor[] = ball(g, q, w).map((qubit, i) => ({ qubit, op: w === 1 ? 'Z' : (['X', 'Y', 'Z'] as const)[i % 3] }));
    const plan = planTerm(kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps, thetaH: 0.7, thetaJ: 0.3 }), factors);
    if (plan.slices === 1 && plan.flops >= 2 ** 20 && plan.flops <= 2 ** 34) calib.push({ label, plan });
  };
  for (const [s, w] of [[4, 10], [4, 17], [5, 10], [5, 17]]) pick(`heavy-hex ${s} steps, weight ${w}`, hh, s, 20, w);
  for (const [s, w] of [[3, 2], [3, 5], [4, 2], [5, 1]]) pick(`square 7x7 ${s} steps, weight ${w}`, sq, s, 24, w);
  for (const [s, w] of [[4, 2], [5, 1], [5, 2]]) pick(`square 6x6 ${s} steps, weight ${w}`, sq6, s, 14, w);
  const rows: { label: string; x: [number, number]; t: number }[] = [];
  for (const { label, plan } of calib) {
    let best = Infinity;
    for (let i = 0; i < (plan.flops < 2 ** 28 ? 3 : 2); i++) {
      const t0 = performance.now();
      contractPlan(plan);
      best = Math.min(best, performance.now() - t0);
    }
    rows.push({ label, x: [plan.flops, plan.steps], t: best / 1000 });
  }
  // weighted least squares (weights 1/t: relative error) through the 2x2 normal equations
  let n00 = 0, n01 = 0, n11 = 0, r0 = 0, r1 = 0;
  for (const { x, t } of rows) {
    const w = 1 / (t * t);
    n00 += w * x[0] * x[0]; n01 += w * x[0] * x[1]; n11 += w * x[1] * x[1];
    r0 += w * x[0] * t; r1 += w * x[1] * t;
  }
  const det = n00 * n11 - n01 * n01;
  const fit = [(r0 * n11 - r1 * n01) / det, (n00 * r1 - n01 * r0) / det];
  console.log(`\nplanner calibration: ${rows.length} networks; fitted ${(1 / fit[0]).toExponential(2)} flops/s, ${(1 / fit[1]).toExponential(2)} steps/s (${(fit[1] * 1e6).toFixed(2)} us per step)`);
  for (const { label, x, t } of rows) {
    const model = tnSeconds({ flops: x[0], steps: x[1] });
    console.log(`  ${label.padEnd(32)} 2^${Math.log2(x[0]).toFixed(1)} flops, ${x[1]} steps, measured ${(t * 1000).toFixed(1)} ms, model ${(model * 1000).toFixed(1)} ms (model / measured ${(model / t).toFixed(2)})`);
  }
  allPass = checkRate('TN_GEMM_RATE', TN_GEMM_RATE, 1 / fit[0], 'real flops/s') && allPass;
  allPass = checkRate('TN_STEP_RATE', TN_STEP_RATE, 1 / fit[1], 'steps/s') && allPass;
  // the model with the constants in use: the median ratio within the tolerance
  const ratios = rows.map(({ x, t }) => tnSeconds({ flops: x[0], steps: x[1] }) / t).sort((a, b) => a - b);
  const median = ratios[Math.floor(ratios.length / 2)];
  allPass = checkRate('tnSeconds (1 / median of model / measured)', 1, 1 / median, 'x') && allPass;
}

console.log(allPass ? '\ntensor-network bench: all targets PASS' : '\ntensor-network bench: a target was MISSED');
if (!allPass) process.exit(1);
