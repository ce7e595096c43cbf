/**
 * Free-fermion (Majorana covariance) solution of the kicked-Ising chain with open boundaries
 * (PHYSICS.md, "Free-fermion solution of the kicked Ising chain").
 *
 * Circuit per step (qubits 0..n-1): RX(thetaH) on every qubit, then RZZ(thetaJ) on every edge
 * (i, i+1); start |0...0>.
 *
 * PHYSICS.md uses 1-based Majoranas g_1..g_2N. Here they are 0-based: Majorana a (0-based) is
 * g_{a+1}, so qubit j (0-based) owns Majoranas 2j and 2j+1:
 *   X_j = i g[2j] g[2j+1],  Z_j Z_{j+1} = i g[2j+1] g[2j+2],  Z_0 = g[0].
 * RX on qubit j rotates the pair (2j, 2j+1) by thetaH; RZZ on (j, j+1) rotates (2j+1, 2j+2) by
 * thetaJ; the Heisenberg map g_a -> sum_b R_ab g_b is R = r_T ... r_1 (left-multiplied in time order).
 * |0...0> = (F+ + F-)/sqrt 2; F+ has covariance M with M[2j-1][2j] = 1 (j = 1..N-1) and
 * M[0][2N-1] = 1; F- has row and column 0 negated. Parity-even quadratics are the average of the
 * two sectors (the M[0][2N-1] entry cancels in the average); <Z_0> = R_00; bulk
 * <Z_j> = Re[i^j Pf K] with K the (2j+2)x(2j+2) antisymmetric matrix (C G C^T)_{p<q}, G = 1 - iM,
 * and C the rows R_0..R_{2j}, then e_0.
 *
 * Exact light-cone reduction (on by default): the value of a term only depends on the sub-chain
 * within the term's causal cone (radius t - 1 around a Z-only support, t around an X), and a
 * sub-chain of the uniform chain is again a kicked-Ising chain, so each term is solved on a chain
 * of at most |support| + 2t sites, and identical sub-problems are solved once. This makes the cost
 * independent of n for long chains; with lightCone: false the whole chain is used.
 *
 * No framework or node: imports.
 */
import type { ObservableSpec, PauliTerm } from './circuit';
import { chainCone } from './light-cone';
import { FREE_FERMION_RATE } from './planner/rates';

export interface KickedIsingChainSpec {
  /** number of sites (qubits) of the open chain */
  n: number;
  thetaJ: number;
  thetaH: number;
  steps: number;
}

export interface FreeFermionOptions {
  /** Solve each term on its causal-cone sub-chain (exact). Default true. */
  lightCone?: boolean;
}

export type FreeFermionResult =
  | { ok: true; value: number; termValues: number[] }
  | { ok: false; reason: string };

/** One supported term, 0-based sites. */
type TermKind = { kind: 'I' } | { kind: 'Z'; site: number } | { kind: 'X'; site: number } | { kind: 'ZZ'; site: number };

function classifyTerm(t: PauliTerm, n: number, k: number): TermKind | string {
  if (!Number.isFinite(t.coef)) return `term ${k}: coefficient is not finite`;
  const f = t.factors;
  for (const x of f) {
    if (!Number.isInteger(x.qubit) || x.qubit < 0 || x.qubit >= n) return `term ${k}: qubit ${x.qubit} is outside the chain 0..${n - 1}`;
  }
  if (f.length === 0) return { kind: 'I' };
  if (f.length === 1) {
    const { qubit, op } = f[0];
    if (op === 'Z') return { kind: 'Z', site: qubit };
    if (op === 'X') return { kind: 'X', site: qubit };
    return `term ${k}: single-site ${op} is not supported by the free-fermion solver (only Z_j, X_j and nearest-neighbour Z_j Z_j+1)`;
  }
  if (f.length === 2 && f[0].op === 'Z' && f[1].op === 'Z') {
    const a = Math.min(f[0].qubit, f[1].qubit), b = Math.max(f[0].qubit, f[1].qubit);
    if (b === a + 1) return { kind: 'ZZ', site: a };
    if (a === b) return `term ${k}: two factors on qubit ${a}`;
    return `term ${k}: Z${a} Z${b} is not a nearest-neighbour pair (the free-fermion solver handles only Z_j Z_j+1)`;
  }
  const desc = f.map((x) => `${x.op}${x.qubit}`).join(' ');
  return `term ${k}: ${desc} is not supported by the free-fermion solver (only Z_j, X_j and nearest-neighbour Z_j Z_j+1)`;
}

function validateSpec(spec: KickedIsingChainSpec): string | null {
  if (!Number.isInteger(spec.n) || spec.n < 1) return `chain length must be a positive integer, got ${spec.n}`;
  if (!Number.isInteger(spec.steps) || spec.steps < 0) return `steps must be a non-negative integer, got ${spec.steps}`;
  if (!Number.isFinite(spec.thetaJ) || !Number.isFinite(spec.thetaH)) return 'angles must be finite';
  return null;
}

/**
 * null when the free-fermion solver handles this observable on an n-site chain, otherwise the
 * reason it does not (for the planner to record).
 */
export function freeFermionUnsupportedReason(n: number, obs: ObservableSpec): string | null {
  if (!Number.isInteger(n) || n < 1) return `chain length must be a positive integer, got ${n}`;
  if (obs.terms.length === 0) return 'observable has no terms';
  for (let k = 0; k < obs.terms.length; k++) {
    const c = classifyTerm(obs.terms[k], n, k);
    if (typeof c === 'string') return c;
  }
  return null;
}

// ------------------------------------------------------------------------------------------------
// Linear algebra

/**
 * Pfaffian of a complex antisymmetric m x m matrix (row-major re/im arrays, overwritten), by the
 * Parlett-Reid (L T L^T) elimination with pivoting. O(m^3 / 3).
 */
export function pfaffian(ar: Float64Array, ai: Float64Array, m: number): { re: number; im: number } {
  if (m % 2 === 1) return { re: 0, im: 0 };
  let pr = 1, pi = 0;
  const tr = new Float64Array(m), ti = new Float64Array(m);
  for (let k = 0; k < m - 1; k += 2) {
    // pivot: largest |A[i][k]| for i > k
    let kp = k + 1;
    let best = -1;
    for (let i = k + 1; i < m; i++) {
      const v = ar[i * m + k] ** 2 + ai[i * m + k] ** 2;
      if (v > best) { best = v; kp = i; }
    }
    if (kp !== k + 1) {
      // swap rows and columns k+1 and kp
      const r1 = (k + 1) * m, r2 = kp * m;
      for (let j = 0; j < m; j++) {
        let x = ar[r1 + j]; ar[r1 + j] = ar[r2 + j]; ar[r2 + j] = x;
        x = ai[r1 + j]; ai[r1 + j] = ai[r2 + j]; ai[r2 + j] = x;
      }
      for (let i = 0; i < m; i++) {
        const a = i * m + k + 1, b = i * m + kp;
        let x = ar[a]; ar[a] = ar[b]; ar[b] = x;
        x = ai[a]; ai[a] = ai[b]; ai[b] = x;
      }
      pr = -pr; pi = -pi;
    }
    const par = ar[k * m + k + 1], pai = ai[k * m + k + 1];
    if (par === 0 && pai === 0) return { re: 0, im: 0 };
    const npr = pr * par - pi * pai;
    pi = pr * pai + pi * par;
    pr = npr;
    if (k + 2 < m) {
      // tau_i = A[k][i] / A[k][k+1]
      const den = par * par + pai * pai;
      for (let i = k + 2; i < m; i++) {
        const xr = ar[k * m + i], xi = ai[k * m + i];
        tr[i] = (xr * par + xi * pai) / den;
        ti[i] = (xi * par - xr * pai) / den;
      }
      // A[i][j] += tau_i A[j][k+1] - A[i][k+1] tau_j  for i, j >= k+2
      for (let i = k + 2; i < m; i++) {
        const tir = tr[i], tii = ti[i];
        const uir = ar[i * m + k + 1], uii = ai[i * m + k + 1];
        const row = i * m;
        for (let j = k + 2; j < m; j++) {
          const ujr = ar[j * m + k + 1], uji = ai[j * m + k + 1];
          ar[row + j] += tir * ujr - tii * uji - (uir * tr[j] - uii * ti[j]);
          ai[row + j] += tir * uji + tii * ujr - (uir * ti[j] + uii * tr[j]);
        }
      }
    }
  }
  return { re: pr, im: pi };
}

/**
 * The 2n x 2n Heisenberg rotation R (row-major Float64Array) of the kicked-Ising circuit:
 * g_a(t) = sum_b R[a][b] g_b. O(t n^2).
 */
export function majoranaRotation(n: number, thetaJ: number, thetaH: number, steps: number): Float64Array {
  const D = 2 * n;
  const R = new Float64Array(D * D);
  for (let a = 0; a < D; a++) R[a * D + a] = 1;
  const ch = Math.cos(thetaH), sh = Math.sin(thetaH);
  const cj = Math.cos(thetaJ), sj = Math.sin(thetaJ);
  const rot = (a: number, b: number, c: number, s: number): void => {
    const ra = a * D, rb = b * D;
    for (let k = 0; k < D; k++) {
      const x = R[ra + k], y = R[rb + k];
      R[ra + k] = c * x + s * y;
      R[rb + k] = c * y - s * x;
    }
  };
  for (let t = 0; t < steps; t++) {
    for (let j = 0; j < n; j++) rot(2 * j, 2 * j + 1, ch, sh);
    for (let j = 0; j + 1 < n; j++) rot(2 * j + 1, 2 * j + 2, cj, sj);
  }
  return R;
}

/** (R M~ R^T)_ab summed over the pairs (2j-1, 2j), j = 1..n-1 (the sector average drops (0, 2n-1)). */
function quadraticAverage(R: Float64Array, n: number, a: number, b: number): number {
  const D = 2 * n;
  const ra = a * D, rb = b * D;
  let v = 0;
  for (let c = 1; c + 1 < D; c += 2) v += R[ra + c] * R[rb + c + 1] - R[ra + c + 1] * R[rb + c];
  return v;
}

/** <Z_j> (0-based j) on an n-site chain with rotation R, by the Pfaffian formula. */
function bulkZ(R: Float64Array, n: number, j: number): number {
  if (j === 0) return R[0];
  const D = 2 * n;
  const m = 2 * j + 2; // rows R_0..R_{2j}, then e_0
  const last = m - 1;
  const kr = new Float64Array(m * m), ki = new Float64Array(m * m);
  for (let p = 0; p < last; p++) {
    const rp = p * D;
    for (let q = p + 1; q < last; q++) {
      const rq = q * D;
      // (C C^T)_pq = 0 (orthonormal rows); (C M C^T)_pq over all pairs of M incl. (0, 2n-1)
      let s = R[rp] * R[rq + D - 1] - R[rp + D - 1] * R[rq];
      for (let c = 1; c + 1 < D; c += 2) s += R[rp + c] * R[rq + c + 1] - R[rp + c + 1] * R[rq + c];
      // K_pq = -i s
      ki[p * m + q] = -s;
      ki[q * m + p] = s;
    }
    // K_{p,last} = (C G C^T)_{p,e0} = R_p0 - i (R M)_{p0} = R_p0 + i R_{p,2n-1}
    kr[p * m + last] = R[rp];
    ki[p * m + last] = R[rp + D - 1];
    kr[last * m + p] = -R[rp];
    ki[last * m + p] = -R[rp + D - 1];
  }
  const pf = pfaffian(kr, ki, m);
  // Re[i^j Pf]
  switch (j & 3) {
    case 0: return pf.re;
    case 1: return -pf.im;
    case 2: return -pf.re;
    default: return pf.im;
  }
}

function termValueOnChain(R: Float64Array, n: number, t: TermKind): number {
  switch (t.kind) {
    case 'I': return 1;
    case 'Z': return bulkZ(R, n, t.site);
    case 'X': return quadraticAverage(R, n, 2 * t.site, 2 * t.site + 1);
    case 'ZZ': return quadraticAverage(R, n, 2 * t.site + 1, 2 * t.site + 2);
  }
}

/** The sub-chain [lo, hi] (0-based, inclusive) that holds the causal cone of a term. */
function coneRange(t: TermKind, n: number, steps: number): [number, number] {
  if (t.kind === 'I') return [0, 0];
  return chainCone(n, steps, t.site, t.kind === 'ZZ' ? t.site + 1 : t.site, t.kind === 'X');
}

/**
 * Exact expectation value of a sum of Z_j, X_j and Z_j Z_j+1 terms after `steps` kicked-Ising
 * steps on an open n-site chain. Returns { ok: false, reason } for any other observable.
 */
export function freeFermionExpectation(
  spec: KickedIsingChainSpec,
  obs: ObservableSpec,
  opts: FreeFermionOptions = {},
): FreeFermionResult {
  const bad = validateSpec(spec) ?? freeFermionUnsupportedReason(spec.n, obs);
  if (bad) return { ok: false, reason: bad };
  const { n, thetaJ, thetaH, steps } = spec;
  const kinds = obs.terms.map((t, k) => classifyTerm(t, n, k) as TermKind);
  const useCone = opts.lightCone !== false;
  const rotations = new Map<number, Float64Array>();
  const rotation = (len: number): Float64Array => {
    let R = rotations.get(len);
    if (!R) {
      R = majoranaRotation(len, thetaJ, thetaH, steps);
      rotations.set(len, R);
    }
    return R;
  };
  const cache = new Map<string, number>();
  const termValues = kinds.map((t) => {
    if (t.kind === 'I') return 1;
    let len = n, site = t.site;
    if (useCone) {
      const [lo, hi] = coneRange(t, n, steps);
      len = hi - lo + 1;
      site = t.site - lo;
    }
    const key = `${len}|${t.kind}|${site}`;
    let v = cache.get(key);
    if (v === undefined) {
      v = termValueOnChain(rotation(len), len, { kind: t.kind, site });
      cache.set(key, v);
    }
    return v;
  });
  let value = 0;
  obs.terms.forEach((t, k) => (value += t.coef * termValues[k]));
  return { ok: true, value, termValues };
}

export interface FreeFermionCost {
  /** rough count of floating-point multiply-adds */
  operations: number;
  /** peak working memory in bytes (the largest R plus one Pfaffian matrix) */
  bytes: number;
  /** distinct sub-problems solved */
  subproblems: number;
  /** estimated wall time at FREE_FERMION_RATE multiply-adds per second (planner/rates.ts, measured by bench/free-fermion.bench.ts) */
  seconds: number;
}

/** Cost estimate of freeFermionExpectation for the same inputs (null if unsupported). */
export function freeFermionCost(spec: KickedIsingChainSpec, obs: ObservableSpec, opts: FreeFermionOptions = {}): FreeFermionCost | null {
  if (validateSpec(spec) ?? freeFermionUnsupportedReason(spec.n, obs)) return null;
  const { n, steps } = spec;
  const useCone = opts.lightCone !== false;
  const seen = new Set<string>();
  const lens = new Set<number>();
  let ops = 0;
  let bytes = 0;
  obs.terms.forEach((term, k) => {
    const t = classifyTerm(term, n, k) as TermKind;
    if (t.kind === 'I') return;
    let len = n, site = t.site;
    if (useCone) {
      const [lo, hi] = coneRange(t, n, steps);
      len = hi - lo + 1;
      site = t.site - lo;
    }
    const key = `${len}|${t.kind}|${site}`;
    if (seen.has(key)) return;
    seen.add(key);
    const D = 2 * len;
    if (!lens.has(len)) {
      lens.add(len);
      ops += steps * (2 * len - 1) * 4 * D; // R: (2 len - 1) row rotations per step
      bytes = Math.max(bytes, 8 * D * D);
    }
    if (t.kind === 'Z' && site > 0) {
      const m = 2 * site + 2;
      ops += ((m * m) / 2) * len * 2 + (4 * m * m * m) / 3; // K entries, then the complex Pfaffian
      bytes = Math.max(bytes, 8 * D * D + 16 * m * m);
    } else {
      ops += 2 * D;
    }
  });
  return { operations: ops, bytes, subproblems: seen.size, seconds: ops / FREE_FERMION_RATE };
}
