/**
 * `npm run reference -- path/to/challenge.json [--out results.json] [--term-budget N]
 *   [--cone-limit Q] [--seconds-budget S] [--tn-memory-gb G] [--threads T]`
 *
 * Validates the challenge, plans every target (shared/physics/planner.ts), computes the exact
 * references (shared/physics/reference.ts) and writes a JSON array, one entry per target:
 *   { targetId, instanceId, params, observableId, value, method, size, unit, wallMs, engineVersion, detail,
 *     width?, flops?, slices? (tensor network), crossCheck?: { method, absDiff } }
 * with value null and a reason where no exact method is feasible. --threads T (default 1) shares the
 * slices of a sliced tensor-network contraction among T worker threads (server/jobs/slice-threads.ts,
 * the reference job's pool); the planner then costs such a term at 1/min(slices, T) of its time. Progress goes to stderr; the
 * JSON goes to --out, or to stdout without it (use `npm run -s reference` so npm's banner stays out
 * of the JSON). Validation errors are printed and exit with 1.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { validateChallenge } from '../shared/physics/challenge';
import { ReferenceRunner } from '../shared/physics/reference';
import type { PlannerOptions } from '../shared/physics/planner';
import { SliceThreads } from '../server/jobs/slice-threads';

function usage(msg?: string): never {
  if (msg) console.error(`reference: ${msg}`);
  console.error('usage: npm run reference -- path/to/challenge.json [--out results.json] [--term-budget N] [--cone-limit Q] [--seconds-budget S] [--tn-memory-gb G] [--threads T]');
  process.exit(1);
}

const args = process.argv.slice(2);
let file: string | undefined;
let out: string | undefined;
const opts: PlannerOptions = {};
let threads = 1;
for (let i = 0; i < args.length; i++) {
  const a = args[i];
  const num = (name: string) => {
    const v = Number(args[++i]);
    if (!Number.isFinite(v) || v <= 0) usage(`${name} needs a positive number`);
    return v;
  };
  if (a === '--out') out = args[++i] ?? usage('--out needs a file name');
  else if (a === '--term-budget') opts.termBudget = num(a);
  else if (a === '--cone-limit') opts.coneQubitLimit = num(a);
  else if (a === '--seconds-budget') opts.secondsBudget = num(a);
  else if (a === '--tn-memory-gb') opts.tnMemoryBytes = num(a) * 1024 ** 3;
  else if (a === '--threads') threads = Math.floor(num(a));
  else if (a === '-h' || a === '--help') usage();
  else if (a.startsWith('--')) usage(`unknown option ${a}`);
  else if (file) usage('give one challenge file');
  else file = a;
}
if (!file) usage('no challenge file given');

let input: unknown;
try {
  input = JSON.parse(readFileSync(file, 'utf8'));
} catch (e) {
  console.error(`reference: cannot read ${file}: ${e instanceof Error ? e.message : String(e)}`);
  process.exit(1);
}
const v = validateChallenge(input);
if (!v.ok) {
  console.error(`reference: ${file} is not a valid challenge:`);
  for (const e of v.errors) console.error(`  ${e.path || '/'}: ${e.message}`);
  process.exit(1);
}
const c = v.challenge;
console.error(`${c.spec.id} v${c.spec.version} sha256:${c.checksum}: ${c.nQubits} qubits, ${c.instances.length} instances, ${c.targets.length} targets`);

const pool = threads > 1 ? new SliceThreads(threads) : null;
const runner = new ReferenceRunner(c, { ...opts, tnThreads: threads, ...(pool ? { contractTerm: (plan, at) => pool.contract(plan, { onStep: at.onStep }) } : {}) });
const t0 = performance.now();
const plans = c.targets.map((t) => runner.plan(t));
console.error(`planned ${plans.length} targets in ${(performance.now() - t0).toFixed(0)} ms`);

const results: unknown[] = [];
const counts: Record<string, number> = {};
plans.forEach((plan, k) => {
  const target = c.targets[k];
  const inst = runner.planner.instance(target.instanceId);
  const r = runner.run(target, plan);
  const { family: _f, ...params } = inst.params;
  void _f;
  const base = { targetId: target.id, instanceId: target.instanceId, params, observableId: target.observableId };
  if (r.value === null) {
    results.push({ ...base, value: null, method: null, size: null, reason: r.reason, engineVersion: r.engineVersion });
    counts.none = (counts.none ?? 0) + 1;
    console.error(`[${k + 1}/${plans.length}] ${target.id}: no exact value (${r.reason})`);
  } else {
    const tn = r.method === 'tensor-network' ? { width: r.width, flops: r.flops, slices: r.slices } : {};
    const cc = r.crossCheck ? { crossCheck: { method: r.crossCheck.method, absDiff: r.crossCheck.absDiff } } : {};
    results.push({ ...base, value: r.value, method: r.method, size: r.size, unit: r.unit, wallMs: Math.round(r.wallMs * 1000) / 1000, engineVersion: r.engineVersion, detail: r.detail, ...tn, ...cc });
    counts[r.method] = (counts[r.method] ?? 0) + 1;
    console.error(`[${k + 1}/${plans.length}] ${target.id}: ${r.value} (${r.method}, ${r.size} ${r.unit}, ${r.wallMs.toFixed(1)} ms)`);
  }
});
const text = JSON.stringify(results, null, 2) + '\n';
if (out) writeFileSync(out, text);
else process.stdout.write(text);
void pool?.close();
console.error(`done in ${((performance.now() - t0) / 1000).toFixed(1)} s: ${Object.entries(counts).map(([m, n]) => `${m} ${n}`).join(', ')}${out ? `; wrote ${out}` : ''}`);
