/**
 * Contraction-order search for closed networks of dimension-2 indices (hyperedges allowed).
 *
 * - Greedy: repeatedly contract the pair of tensors sharing an index with the lowest
 *   score(size_out - alpha (size_a + size_b)), log-compressed; random restarts draw alpha and a
 *   temperature and add Gumbel noise to every candidate (a Boltzmann choice), from a seeded
 *   generator, so the search is deterministic for a given seed (the scheme of Gray and Kourtis 2021,
 *   "Hyper-optimized tensor network contraction", Quantum 5:410, and of opt_einsum's random greedy).
 * - Local improvement: subtree reconfiguration. For each internal node, cut its subtree at up to
 *   `k` frontier subtrees and re-contract them optimally (dynamic programming over the 2^k subsets),
 *   never widening beyond the tree's width; repeated until a pass gains nothing.
 * - Slicing: while the width is above the memory budget's, fix the index (taken from the widest
 *   intermediates) whose removal costs the fewest total flops over all slices.
 *
 * Costs (all indices have dimension 2): an intermediate with r legs holds 2^r amplitudes; the width
 * is the largest r; a pairwise contraction costs 8 x 2^|legs(a) U legs(b)| real flops (one complex
 * multiply-add per element of the joint index space).
 *
 * No framework or node: imports.
 */

/** A contraction tree in SSA form: leaves 0..T-1; step s contracts ids pairs[s] into id T + s. */
import { createRng } from '../../scoring/prng';

export interface ContractionTree {
  nLeaves: number;
  pairs: [number, number][];
}

export interface TreeCost {
  /** log2 of the largest intermediate (or leaf) */
  width: number;
  /** total real flops (8 per complex multiply-add), over all slices */
  flops: number;
  /** estimated peak bytes: inputs, output and split scratch copies of the largest step */
  memoryBytes: number;
  /** pairwise steps, over all slices */
  steps?: number;
}

/** Deterministic uniform generator: the project's seeded mulberry32 (shared/scoring/prng.ts), same sequence. */
export function rng(seed: number): () => number {
  const r = createRng(seed);
  return () => r.uniform();
}

/** Sorted leg list with, per leg, how many leaves of the subtree hold it. */
interface Legs {
  ids: Int32Array;
  cnt: Int32Array;
}

/** Merge two leg lists; legs whose count reaches the total (all holders inside) are summed away. */
function mergeLegs(a: Legs, b: Legs, total: Int32Array): { out: Legs; union: number } {
  const ids = new Int32Array(a.ids.length + b.ids.length);
  const cnt = new Int32Array(ids.length);
  let i = 0, j = 0, o = 0, union = 0;
  while (i < a.ids.length || j < b.ids.length) {
    let id: number, c: number;
    if (j >= b.ids.length || (i < a.ids.length && a.ids[i] < b.ids[j])) {
      id = a.ids[i];
      c = a.cnt[i++];
    } else if (i >= a.ids.length || b.ids[j] < a.ids[i]) {
      id = b.ids[j];
      c = b.cnt[j++];
    } else {
      id = a.ids[i];
      c = a.cnt[i++] + b.cnt[j++];
    }
    union++;
    if (c < total[id]) {
      ids[o] = id;
      cnt[o++] = c;
    }
  }
  return { out: { ids: ids.slice(0, o), cnt: cnt.slice(0, o) }, union };
}

/** Rank of the merge without building it; union size too. */
function mergeRank(a: Legs, b: Legs, total: Int32Array): { rank: number; union: number } {
  let i = 0, j = 0, rank = 0, union = 0;
  const ai = a.ids, bi = b.ids;
  while (i < ai.length || j < bi.length) {
    if (j >= bi.length || (i < ai.length && ai[i] < bi[j])) {
      union++;
      rank++;
      i++;
    } else if (i >= ai.length || bi[j] < ai[i]) {
      union++;
      rank++;
      j++;
    } else {
      union++;
      if (a.cnt[i] + b.cnt[j] < total[ai[i]]) rank++;
      i++;
      j++;
    }
  }
  return { rank, union };
}

function leafLegs(legs: readonly number[]): Legs {
  const ids = Int32Array.from(legs).sort();
  return { ids, cnt: new Int32Array(ids.length).fill(1) };
}

function totals(leaves: readonly (readonly number[])[], nLegs: number): Int32Array {
  const t = new Int32Array(nLegs);
  for (const l of leaves) for (const x of l) t[x]++;
  return t;
}

/** Binary min-heap of (score, u, v). */
class Heap {
  private s: number[] = [];
  private u: number[] = [];
  private v: number[] = [];
  get size(): number {
    return this.s.length;
  }
  push(score: number, u: number, v: number): void {
    const s = this.s, U = this.u, V = this.v;
    let i = s.length;
    s.push(score);
    U.push(u);
    V.push(v);
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (s[p] <= score) break;
      s[i] = s[p]; U[i] = U[p]; V[i] = V[p];
      i = p;
    }
    s[i] = score; U[i] = u; V[i] = v;
  }
  pop(): [number, number] {
    const s = this.s, U = this.u, V = this.v;
    const ru = U[0], rv = V[0];
    const ls = s.pop() as number, lu = U.pop() as number, lv = V.pop() as number;
    const n = s.length;
    if (n > 0) {
      let i = 0;
      for (;;) {
        let c = 2 * i + 1;
        if (c >= n) break;
        if (c + 1 < n && s[c + 1] < s[c]) c++;
        if (s[c] >= ls) break;
        s[i] = s[c]; U[i] = U[c]; V[i] = V[c];
        i = c;
      }
      s[i] = ls; U[i] = lu; V[i] = lv;
    }
    return [ru, rv];
  }
}

export interface GreedyParams {
  /** weight of the removed input sizes (1: plain greedy) */
  alpha: number;
  /** Gumbel noise scale (0: deterministic) */
  temperature: number;
}

/**
 * The live tensors of a tree being built: their legs, which tensor holds each leg, and the SSA
 * pairs so far. Shared by the greedy and the elimination builders.
 */
class Builder {
  readonly total: Int32Array;
  readonly legs: (Legs | null)[];
  readonly holders: Set<number>[];
  readonly pairs: [number, number][] = [];
  live: number;
  constructor(leaves: readonly (readonly number[])[], nLegs: number) {
    this.total = totals(leaves, nLegs);
    this.legs = leaves.map(leafLegs);
    this.holders = Array.from({ length: nLegs }, () => new Set<number>());
    this.legs.forEach((l, i) => {
      for (const x of (l as Legs).ids) this.holders[x].add(i);
    });
    this.live = leaves.length;
  }
  /** contract u and v into a new id (returned) */
  contract(u: number, v: number): number {
    const a = this.legs[u] as Legs, b = this.legs[v] as Legs;
    const { out } = mergeLegs(a, b, this.total);
    const w = this.legs.length;
    this.legs.push(out);
    this.legs[u] = null;
    this.legs[v] = null;
    for (const x of a.ids) this.holders[x].delete(u);
    for (const x of b.ids) this.holders[x].delete(v);
    for (const x of out.ids) this.holders[x].add(w);
    this.pairs.push([u, v]);
    this.live--;
    return w;
  }
  /** pieces not linked by any index (scalars, disconnected parts): the two smallest next */
  contractSmallestTwo(): number {
    const rest: number[] = [];
    this.legs.forEach((l, i) => { if (l) rest.push(i); });
    rest.sort((x, y) => (this.legs[x] as Legs).ids.length - (this.legs[y] as Legs).ids.length);
    return this.contract(rest[0], rest[1]);
  }
}

/** One greedy run. */
export function greedyTree(leaves: readonly (readonly number[])[], nLegs: number, p: GreedyParams, random: () => number): ContractionTree {
  const T = leaves.length;
  const st = new Builder(leaves, nLegs);
  const { total, legs, holders } = st;
  const heap = new Heap();
  const score = (a: Legs, b: Legs): number => {
    const { rank } = mergeRank(a, b, total);
    const raw = 2 ** rank - p.alpha * (2 ** a.ids.length + 2 ** b.ids.length);
    let s = raw >= 0 ? Math.log2(1 + raw) : -Math.log2(1 - raw);
    if (p.temperature > 0) s -= p.temperature * -Math.log(-Math.log(random() || 1e-300));
    return s;
  };
  const seen = new Set<number>();
  const pushPairsOf = (u: number) => {
    seen.clear();
    const lu = legs[u] as Legs;
    for (const x of lu.ids) {
      for (const v of holders[x]) {
        if (v === u || seen.has(v)) continue;
        seen.add(v);
        heap.push(score(lu, legs[v] as Legs), Math.min(u, v), Math.max(u, v));
      }
    }
  };
  for (let i = 0; i < T; i++) pushPairsOf(i);
  while (st.live > 1) {
    let done = false;
    while (heap.size) {
      const [u, v] = heap.pop();
      if (legs[u] && legs[v]) {
        pushPairsOf(st.contract(u, v));
        done = true;
        break;
      }
    }
    if (!done) pushPairsOf(st.contractSmallestTwo());
  }
  return { nLeaves: T, pairs: st.pairs };
}

// ------------------------------------------------------------------------------------------------
// Elimination orders (min-fill / min-degree on the index graph)

export interface EliminationParams {
  /** 'min-fill': fewest edges added among the neighbours; 'min-degree': fewest neighbours */
  heuristic: 'min-fill' | 'min-degree';
  /** Gumbel noise scale on the heuristic's score (0: deterministic, ties to the lowest index) */
  temperature: number;
  /** stop and return null once an elimination would create an intermediate wider than this */
  abandonAbove?: number;
}

/**
 * A contraction tree from an elimination order of the indices: the index graph joins two indices
 * when a tensor holds both; eliminating index v contracts every tensor holding v (smallest pairs
 * first) and makes v's neighbours a clique. The widest intermediate is then the largest
 * neighbourhood met, so a good order is a good tree decomposition of the line graph, the
 * classical route to contraction orders of quantum circuits (Markov and Shi 2008, "Simulating
 * quantum computation by contracting tensor networks", SIAM J. Comput. 38:963); min-fill and
 * min-degree are the usual greedy heuristics for such orders (common practice). On deep circuit
 * networks it finds far narrower trees than pairwise greedy, which sees only one pair at a time.
 */
export function eliminationTree(leaves: readonly (readonly number[])[], nLegs: number, p: EliminationParams, random: () => number): ContractionTree | null {
  const T = leaves.length;
  const st = new Builder(leaves, nLegs);
  const { total, legs, holders } = st;
  const adj: Set<number>[] = Array.from({ length: nLegs }, () => new Set<number>());
  for (const l of leaves) {
    for (const a of l) for (const b of l) if (a !== b) adj[a].add(b);
  }
  const alive = new Uint8Array(nLegs);
  const aliveList: number[] = [];
  for (let x = 0; x < nLegs; x++) if (total[x] > 0) { alive[x] = 1; aliveList.push(x); }
  const score = new Float64Array(nLegs);
  const dirty = new Uint8Array(nLegs).fill(1);
  const fill = (u: number): number => {
    const nb = [...adj[u]];
    if (p.heuristic === 'min-degree') return nb.length;
    let f = 0;
    for (let i = 0; i < nb.length; i++) {
      const ai = adj[nb[i]];
      for (let j = i + 1; j < nb.length; j++) if (!ai.has(nb[j])) f++;
    }
    // degree breaks ties between equal fills
    return f + nb.length / 1024;
  };
  const noise = (): number => (p.temperature > 0 ? p.temperature * -Math.log(-Math.log(random() || 1e-300)) : 0);
  let remaining = aliveList.length;
  while (remaining > 0) {
    // the alive index with the lowest (noisy) score
    let v = -1;
    let best = Infinity;
    for (const x of aliveList) {
      if (!alive[x]) continue;
      if (dirty[x]) {
        score[x] = fill(x);
        dirty[x] = 0;
      }
      const s = score[x] + noise();
      if (s < best) {
        best = s;
        v = x;
      }
    }
    if (v < 0) break;
    const nb = [...adj[v]];
    if (p.abandonAbove !== undefined && nb.length > p.abandonAbove) return null;
    // contract the tensors holding v, the two smallest first
    const bucket = [...holders[v]];
    while (bucket.length > 1) {
      bucket.sort((x, y) => (legs[x] as Legs).ids.length - (legs[y] as Legs).ids.length);
      const w = st.contract(bucket[0], bucket[1]);
      bucket.splice(0, 2, w);
    }
    // indices summed away by these contractions (v and any whose last holders met) leave the graph
    const gone: number[] = [v];
    for (const x of nb) if (holders[x].size === 0) gone.push(x);
    for (const g of gone) {
      if (!alive[g]) continue;
      alive[g] = 0;
      remaining--;
      for (const y of adj[g]) adj[y].delete(g);
    }
    // v's other neighbours become a clique; their neighbours' fill scores change
    const keep = nb.filter((x) => alive[x]);
    for (let i = 0; i < keep.length; i++) {
      const ai = adj[keep[i]];
      for (let j = 0; j < keep.length; j++) if (i !== j) ai.add(keep[j]);
    }
    for (const x of keep) {
      dirty[x] = 1;
      if (p.heuristic === 'min-fill') for (const y of adj[x]) dirty[y] = 1;
    }
    if (aliveList.length > 64 && remaining < aliveList.length / 2) {
      // compact the scan list now and then
      const kept = aliveList.filter((x) => alive[x]);
      aliveList.length = 0;
      aliveList.push(...kept);
    }
  }
  // what is left (scalars, or pieces not linked by any index): smallest first
  while (st.live > 1) st.contractSmallestTwo();
  return { nLeaves: T, pairs: st.pairs };
}

/** Width, flops and memory of a tree, with the legs in `sliced` fixed (flops over all slices). */
export function treeCost(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, sliced: readonly number[] = []): TreeCost {
  const total = totals(leaves, nLegs);
  const cut = new Uint8Array(nLegs);
  for (const s of sliced) cut[s] = 1;
  const legs: Legs[] = leaves.map((l) => leafLegs(l.filter((x) => !cut[x])));
  const tot = Int32Array.from(total, (t, i) => (cut[i] ? 0x7fffffff : t));
  let width = 0;
  for (const l of legs) width = Math.max(width, l.ids.length);
  let flops = 0;
  let mem = 0;
  for (const [u, v] of tree.pairs) {
    const { out, union } = mergeLegs(legs[u], legs[v], tot);
    legs.push(out);
    width = Math.max(width, out.ids.length);
    flops += 8 * 2 ** union;
    mem = Math.max(mem, 32 * (2 ** legs[u].ids.length + 2 ** legs[v].ids.length + 2 ** out.ids.length));
  }
  const n = 2 ** sliced.length;
  return { width, flops: flops * n, memoryBytes: mem, steps: tree.pairs.length * n };
}

// ------------------------------------------------------------------------------------------------
// Subtree reconfiguration

interface Node {
  left: number;
  right: number;
  legs: Legs;
}

function treeNodes(leaves: readonly (readonly number[])[], tree: ContractionTree, total: Int32Array): Node[] {
  const nodes: Node[] = leaves.map((l) => ({ left: -1, right: -1, legs: leafLegs(l) }));
  for (const [u, v] of tree.pairs) nodes.push({ left: u, right: v, legs: mergeLegs(nodes[u].legs, nodes[v].legs, total).out });
  return nodes;
}

function unionSize(a: Legs, b: Legs): number {
  let i = 0, j = 0, u = 0;
  while (i < a.ids.length && j < b.ids.length) {
    if (a.ids[i] < b.ids[j]) i++;
    else if (a.ids[i] > b.ids[j]) j++;
    else { u++; i++; j++; }
  }
  return a.ids.length + b.ids.length - u;
}

/**
 * Subtree reconfiguration: returns an improved tree (same leaves), minimising total flops while
 * keeping every intermediate within `maxWidth` (default: the tree's current width).
 */
export function reconfigure(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, opts: { k?: number; passes?: number; maxWidth?: number } = {}): ContractionTree {
  const k = opts.k ?? 8;
  const total = totals(leaves, nLegs);
  const nodes = treeNodes(leaves, tree, total);
  const T = leaves.length;
  const cap = opts.maxWidth ?? nodes.reduce((m, nd) => Math.max(m, nd.legs.ids.length), 0);
  const root = nodes.length - 1;
  const maxMask = 1 << k;
  const mLegs: (Legs | null)[] = new Array(maxMask).fill(null);
  const mCost = new Float64Array(maxMask);
  const mSplit = new Int32Array(maxMask);
  for (let pass = 0; pass < (opts.passes ?? 4); pass++) {
    let improved = false;
    for (let id = T; id < nodes.length; id++) {
      const nd = nodes[id];
      if (nd.left < 0) continue;
      // frontier: expand the largest internal item until k items
      const front: number[] = [nd.left, nd.right];
      const internal: number[] = [id];
      while (front.length < k) {
        let best = -1;
        for (let f = 0; f < front.length; f++) {
          const x = front[f];
          if (nodes[x].left >= 0 && (best < 0 || nodes[x].legs.ids.length > nodes[front[best]].legs.ids.length)) best = f;
        }
        if (best < 0) break;
        const x = front[best];
        front.splice(best, 1, nodes[x].left, nodes[x].right);
        internal.push(x);
      }
      if (front.length < 3) continue;
      // current cost of the internal nodes
      let cur = 0;
      for (const x of internal) cur += 2 ** unionSize(nodes[nodes[x].left].legs, nodes[nodes[x].right].legs);
      // DP over subsets
      const m = front.length;
      const full = (1 << m) - 1;
      for (let f = 0; f < m; f++) {
        mLegs[1 << f] = nodes[front[f]].legs;
        mCost[1 << f] = 0;
      }
      for (let mask = 1; mask <= full; mask++) {
        if ((mask & (mask - 1)) === 0) continue;
        const low = mask & -mask;
        mLegs[mask] = mergeLegs(mLegs[mask ^ low] as Legs, mLegs[low] as Legs, total).out;
        mCost[mask] = Infinity;
        if (mask !== full && (mLegs[mask] as Legs).ids.length > cap) continue;
        // splits A | B with the lowest bit in A
        const rest = mask ^ low;
        for (let sub = rest; ; sub = (sub - 1) & rest) {
          const A = sub | low;
          const B = mask ^ A;
          if (B !== 0) {
            const c = mCost[A] + mCost[B];
            if (c < mCost[mask]) {
              const cc = c + 2 ** unionSize(mLegs[A] as Legs, mLegs[B] as Legs);
              if (cc < mCost[mask]) {
                mCost[mask] = cc;
                mSplit[mask] = A;
              }
            }
          }
          if (sub === 0) break;
        }
      }
      if (mCost[full] < cur * (1 - 1e-9)) {
        // rebuild: reuse the internal node ids (id stays the subtree root)
        const free = internal.filter((x) => x !== id);
        const build = (mask: number, target: number): number => {
          if ((mask & (mask - 1)) === 0) return front[31 - Math.clz32(mask)];
          const A = mSplit[mask];
          const l = build(A, -1);
          const r = build(mask ^ A, -1);
          const x = target >= 0 ? target : (free.pop() as number);
          nodes[x].left = l;
          nodes[x].right = r;
          nodes[x].legs = mergeLegs(nodes[l].legs, nodes[r].legs, total).out;
          return x;
        };
        build(full, id);
        improved = true;
      }
    }
    if (!improved) break;
  }
  // back to SSA order by a post-order walk from the root
  const pairs: [number, number][] = [];
  const ssa = new Int32Array(nodes.length).fill(-1);
  for (let i = 0; i < T; i++) ssa[i] = i;
  const stack: [number, boolean][] = [[root, false]];
  while (stack.length) {
    const [x, ready] = stack.pop() as [number, boolean];
    const nd = nodes[x];
    if (nd.left < 0) continue;
    if (ready) {
      ssa[x] = T + pairs.length;
      pairs.push([ssa[nd.left], ssa[nd.right]]);
    } else {
      stack.push([x, true], [nd.right, false], [nd.left, false]);
    }
  }
  return { nLeaves: T, pairs };
}

// ------------------------------------------------------------------------------------------------
// Slicing

/** Most indices sliced in one plan (2^16 slices): past it slicing is hopeless (each doubles the work). */
export const MAX_SLICED = 16;

/**
 * The slicing candidates: legs of the tensors with at least `minWidth` legs once the legs in
 * `sliced` are fixed, intermediates (and leaves, with `withLeaves`), in the order met.
 */
function wideLegs(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, sliced: readonly number[], total: Int32Array, minWidth: number, withLeaves: boolean): Set<number> {
  const cut = new Uint8Array(nLegs);
  for (const s of sliced) cut[s] = 1;
  const tot = Int32Array.from(total, (t, i) => (cut[i] ? 0x7fffffff : t));
  const legs: Legs[] = leaves.map((l) => leafLegs(l.filter((x) => !cut[x])));
  const cand = new Set<number>();
  if (withLeaves) for (const l of legs) if (l.ids.length >= minWidth) for (const x of l.ids) cand.add(x);
  for (const [u, v] of tree.pairs) {
    const { out } = mergeLegs(legs[u], legs[v], tot);
    legs.push(out);
    if (out.ids.length >= minWidth) for (const x of out.ids) cand.add(x);
  }
  return cand;
}

/** Choose legs to fix until the width is <= maxWidth; each pick minimises the total flops. */
export function chooseSlices(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, maxWidth: number, maxSliced = 40): number[] {
  const sliced: number[] = [];
  const total = totals(leaves, nLegs);
  for (;;) {
    const cost = treeCost(leaves, nLegs, tree, sliced);
    if (cost.width <= maxWidth || sliced.length >= maxSliced) return sliced;
    const cand = wideLegs(leaves, nLegs, tree, sliced, total, cost.width, true);
    let best = -1;
    let bestKey = Infinity;
    for (const x of cand) {
      const c = treeCost(leaves, nLegs, tree, [...sliced, x]);
      const key = c.width * 1e3 + Math.log2(c.flops);
      if (key < bestKey) {
        bestKey = key;
        best = x;
      }
    }
    if (best < 0) return sliced;
    sliced.push(best);
  }
}

/**
 * Slices for parallel work: more legs fixed after the memory budget's (`sliced`) until there are at
 * least `minSlices` slices, each pick the one that adds the fewest flops, and only while the total
 * stays within `maxOverhead` times the flops of `sliced`. A long contraction cut this way runs its
 * slices on several threads (or slice jobs) with little extra work; legs of the widest
 * intermediates are the candidates, as in chooseSlices (fixing a leg the big steps share halves
 * those steps, so the total barely moves).
 */
export function sliceForParallel(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, sliced: readonly number[], minSlices: number, maxOverhead: number): number[] {
  const out = [...sliced];
  const total = totals(leaves, nLegs);
  const base = treeCost(leaves, nLegs, tree, out).flops;
  while (2 ** out.length < minSlices) {
    const cand = wideLegs(leaves, nLegs, tree, out, total, treeCost(leaves, nLegs, tree, out).width - 1, false);
    let best = -1;
    let bestFlops = Infinity;
    for (const x of cand) {
      const f = treeCost(leaves, nLegs, tree, [...out, x]).flops;
      if (f < bestFlops) {
        bestFlops = f;
        best = x;
      }
    }
    if (best < 0 || bestFlops > maxOverhead * base) break;
    out.push(best);
  }
  return out;
}

// ------------------------------------------------------------------------------------------------
// The search

export interface SearchOptions {
  /** greedy runs (the first deterministic); default 64 */
  restarts?: number;
  /** seed of the random restarts; default 1 */
  seed?: number;
  /** subtree size for reconfiguration; default 8 (0: none) */
  reconfigureK?: number;
  /** widths above this are penalised when ranking restarts (the memory budget's width) */
  targetWidth?: number;
}

export interface SearchResult {
  tree: ContractionTree;
  cost: TreeCost;
  /** width and flops of the best plain greedy restart (before the elimination orders and reconfiguration) */
  greedy: TreeCost;
  /** best width seen over the restarts */
  bestRestartWidth: number;
}

/** Ranking of a tree: log2 flops, plus a penalty for every unit of width above the target. */
function rank(c: TreeCost, target: number): number {
  return Math.log2(c.flops) + 2 * Math.max(0, c.width - target);
}

/**
 * Rank of a tree once sliced to the target width (MAX_SLICED legs at most): log2 of the sliced
 * flops, and the plain rank's width penalty for what slicing cannot remove.
 */
function slicedRank(leaves: readonly (readonly number[])[], nLegs: number, tree: ContractionTree, target: number): number {
  const c = treeCost(leaves, nLegs, tree);
  if (c.width <= target || c.width - target > MAX_SLICED) return rank(c, target);
  return rank(treeCost(leaves, nLegs, tree, chooseSlices(leaves, nLegs, tree, target, MAX_SLICED)), target);
}

export function searchOrder(leaves: readonly (readonly number[])[], nLegs: number, opts: SearchOptions = {}): SearchResult {
  const restarts = Math.max(1, opts.restarts ?? 64);
  const random = rng(opts.seed ?? 1);
  const target = opts.targetWidth ?? 27;
  let best: ContractionTree | null = null;
  let bestCost: TreeCost | null = null;
  let bestRestartWidth = Infinity;
  for (let r = 0; r < restarts; r++) {
    const p: GreedyParams = r === 0 ? { alpha: 1, temperature: 0 } : { alpha: 0.5 + 1.5 * random(), temperature: 0.02 + random() };
    const t = greedyTree(leaves, nLegs, p, random);
    const c = treeCost(leaves, nLegs, t);
    bestRestartWidth = Math.min(bestRestartWidth, c.width);
    if (!bestCost || rank(c, target) < rank(bestCost, target)) {
      best = t;
      bestCost = c;
    }
  }
  const greedy = bestCost as TreeCost;
  // elimination orders: the deterministic min-fill and min-degree orders, then noisy min-fill runs
  // where the contraction is worth a longer search: none when the greedy tree costs at most 2^30
  // flops (about a second), up to 8 below 2^36, else half as many as the greedy restarts (4 to 32);
  // one with a single restart. A run stops as soon as it would be 3 wider than the best tree so far.
  const worth = greedy.flops <= 2 ** 30 ? 0 : greedy.flops <= 2 ** 36 ? 8 : 32;
  const noisy = restarts === 1 ? Math.min(1, worth) : Math.min(worth, Math.max(4, Math.round(restarts / 2)));
  const pool: { tree: ContractionTree; cost: TreeCost }[] = [{ tree: best as ContractionTree, cost: greedy }];
  for (let r = 0; r < noisy + 2; r++) {
    const p: EliminationParams = r === 0 ? { heuristic: 'min-fill', temperature: 0 } : r === 1 ? { heuristic: 'min-degree', temperature: 0 } : { heuristic: 'min-fill', temperature: 0.2 + 2.3 * random() };
    const t = eliminationTree(leaves, nLegs, { ...p, abandonAbove: (bestCost as TreeCost).width + 3 }, random);
    if (!t) continue;
    const c = treeCost(leaves, nLegs, t);
    pool.push({ tree: t, cost: c });
    if (rank(c, target) < rank(bestCost as TreeCost, target)) {
      best = t;
      bestCost = c;
    }
  }
  let tree = best as ContractionTree;
  if ((opts.reconfigureK ?? 8) >= 3 && leaves.length > 2) {
    // reconfigure the three best candidates (a narrower tree often hides behind a slightly worse one);
    // a candidate wider than the target is ranked by what it costs once sliced to the target (the
    // width penalty alone undercounts: cutting 3 widths can cost 2^4 in flops, or nothing)
    pool.sort((a, b) => rank(a.cost, target) - rank(b.cost, target));
    let bestRank = Infinity;
    for (const cand of pool.slice(0, 3)) {
      const t = reconfigure(leaves, nLegs, cand.tree, { k: opts.reconfigureK ?? 8 });
      const rk = slicedRank(leaves, nLegs, t, target);
      if (rk < bestRank) {
        bestRank = rk;
        tree = t;
      }
    }
  }
  return { tree, cost: treeCost(leaves, nLegs, tree), greedy, bestRestartWidth };
}
