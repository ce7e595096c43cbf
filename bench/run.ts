/**
 * `npm run bench`: runs every bench/*.bench.ts as its own process (so one benchmark's heap and JIT
 * state do not colour the next), prints their figures and a summary, and exits 1 when any
 * benchmark missed a target (each one exits non-zero on a MISS) or failed.
 *
 *   npm run bench                     every benchmark at full size
 *   npm run bench -- planner scoring  the ones whose file name contains a word
 *   npm run bench -- --short          the short form CI runs (.ci/run): every benchmark, in about
 *                                     2 minutes on 2 cores, with BENCH_SHORT=1
 *
 * The short form keeps every target and checks it. What it shortens is repetitions and durations,
 * never the size a target is stated for: absolute targets (planner, scoring, standings
 * recomputation, entry validation, Pauli propagation rate, load p99) are measured on the same
 * workload as the full form with fewer repetitions; ratio targets (statevector against a copy of
 * the same state, cached standings against a trivial route, repeated moderation queue against the
 * first, tensor contraction against numpy) are still measured side by side in one process, each
 * timing beside its reference. Each benchmark's header says what its short form does. A
 * benchmark that runs longer than its time limit (short form: 150 s) is killed and counts as failed.
 */
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const dir = fileURLToPath(new URL('.', import.meta.url));
const args = process.argv.slice(2);
const short = args.includes('--short') || process.env.BENCH_SHORT === '1';
const only = args.filter((a) => !a.startsWith('--'));
const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
  .sort();
const limitMs = short ? 150_000 : 1_800_000;
const t00 = performance.now();
const summary: { file: string; seconds: number; status: string }[] = [];
for (const f of files) {
  console.log(`\n=== ${f}${short ? ' (short form)' : ''} ===`);
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--import', 'tsx', '--expose-gc', `${dir}${f}`], {
    stdio: 'inherit',
    timeout: limitMs,
    killSignal: 'SIGKILL',
    env: { ...process.env, ...(short ? { BENCH_SHORT: '1' } : {}) },
  });
  const status = r.error ? `failed (${r.signal === 'SIGKILL' ? `killed after the ${limitMs / 1000} s limit` : r.error.message})`
    : r.status === 0 ? 'pass' : r.signal ? `failed (${r.signal})` : `MISS or failure (exit ${r.status})`;
  summary.push({ file: f, seconds: (performance.now() - t0) / 1000, status });
}
const failed = summary.filter((s) => s.status !== 'pass');
console.log(`\n=== summary${short ? ' (short form)' : ''}: ${summary.length} benchmarks in ${((performance.now() - t00) / 1000).toFixed(0)} s ===`);
for (const s of summary) console.log(`  ${s.file.padEnd(32)} ${s.seconds.toFixed(1).padStart(6)} s  ${s.status}`);
if (files.length === 0) {
  console.error('no benchmark matched');
  process.exit(1);
}
if (failed.length) {
  console.error(`\n${failed.length} benchmark(s) missed a target or failed: ${failed.map((s) => s.file).join(', ')}`);
  process.exit(1);
}
