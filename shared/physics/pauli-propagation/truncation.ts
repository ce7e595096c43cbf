/** Truncation: coefficient threshold, weight limit and term budget, and the removals they need. */
import type { Stats } from './options';
import { EMPTY, GOLDEN, PauliSum } from './sum';
import { Scratch } from './scratch';

export interface Trunc {
  delta: number;
  maxWeight: number;
  maxXY: number;
  maxTerms: number;
}

export function truncateAll(sum: PauliSum, tr: Trunc, st: Stats): void {
  const drop = new Uint8Array(sum.count);
  let any = false;
  for (let i = 0; i < sum.count; i++) {
    const c = sum.coef[i];
    if (Math.abs(c) < tr.delta || sum.weightOf(i) > tr.maxWeight || sum.xyOf(i) > tr.maxXY) {
      drop[i] = 1;
      any = true;
      st.droppedTerms++;
      st.droppedWeight += Math.abs(c);
    }
  }
  if (any) sum.compact(drop);
  if (sum.count > tr.maxTerms) keepLargest(sum, tr.maxTerms, st, new Scratch());
}

/** Local weight and X/Y count of a code over 2 qubit slots. */
export function grow(del: Int32Array, scratch: Scratch): Int32Array {
  const d = new Int32Array(del.length * 2);
  d.set(del);
  scratch.del = d;
  return d;
}

/** Remove the listed terms (distinct indices), accounting their weight as dropped. */
export function removeIndices(sum: PauliSum, del: Int32Array, nDel: number, st: Stats, scratch: Scratch): void {
  const coef = sum.coef;
  for (let k = 0; k < nDel; k++) st.droppedWeight += Math.abs(coef[del[k]]);
  st.droppedTerms += nDel;
  if (nDel * 8 > sum.count || sum.tableStale) {
    const drop = scratch.dropFlags(sum.count);
    for (let k = 0; k < nDel; k++) drop[del[k]] = 1;
    sum.compact(drop);
    return;
  }
  // few deletions: swap-remove with the last term, highest index first, keeping the table valid
  const d = del.subarray(0, nDel);
  d.sort();
  const S = sum.S;
  for (let k = nDel - 1; k >= 0; k--) {
    const i = d[k];
    tableRemove(sum, i);
    const last = sum.count - 1;
    if (i !== last) {
      tableReplace(sum, last, i);
      const words = sum.words, ib = i * S, lb = last * S;
      for (let k = 0; k < S; k++) words[ib + k] = words[lb + k];
      sum.coef[i] = sum.coef[last];
      sum.hash[i] = sum.hash[last];
      sum.mark[i] = sum.mark[last];
    }
    sum.count = last;
  }
}

/** Remove term i's slot (backward-shift deletion for linear probing). */
function tableRemove(sum: PauliSum, i: number): void {
  const slots = sum.slots, mask = slots.length - 1, shift = sum.shift, hash = sum.hash;
  let s = Math.imul(hash[i], GOLDEN) >>> shift;
  while (slots[s] !== i) s = (s + 1) & mask;
  let hole = s;
  let j = s;
  for (;;) {
    j = (j + 1) & mask;
    const e = slots[j];
    if (e === EMPTY) break;
    const home = Math.imul(hash[e], GOLDEN) >>> shift;
    // e may move into the hole iff its home is not cyclically in (hole, j]
    const inRange = hole <= j ? home > hole && home <= j : home > hole || home <= j;
    if (inRange) continue;
    slots[hole] = e;
    hole = j;
  }
  slots[hole] = EMPTY;
}

/** The slot holding index `from` now holds `to`. */
function tableReplace(sum: PauliSum, from: number, to: number): void {
  const slots = sum.slots, mask = slots.length - 1;
  let s = Math.imul(sum.hash[from], GOLDEN) >>> sum.shift;
  while (slots[s] !== from) s = (s + 1) & mask;
  slots[s] = to;
}

/** Keep the `budget` terms of largest |c|. */
export function keepLargest(sum: PauliSum, budget: number, st: Stats, scratch: Scratch): void {
  const N = sum.count;
  if (N <= budget) return;
  const k = N - budget; // number to drop: the k smallest |c|
  const coef = sum.coef;
  // Gather the candidates below a guess T (from the previous prune), in index order, so the
  // selection runs on a small set; widen T until at least k candidates are found.
  let T = scratch.lastThr > 0 ? scratch.lastThr * 2 : Infinity;
  let m: number;
  for (;;) {
    if (scratch.abs.length < N) scratch.abs = new Float64Array(Math.ceil(N * 1.5));
    if (scratch.candIdx.length < N) scratch.candIdx = new Int32Array(Math.ceil(N * 1.5));
    const val = scratch.abs, idx = scratch.candIdx;
    m = 0;
    for (let i = 0; i < N; i++) {
      const a = coef[i] < 0 ? -coef[i] : coef[i];
      if (a < T) {
        val[m] = a;
        idx[m++] = i;
      }
    }
    if (m >= k) break;
    T = Infinity; // the guess was too low: take every term as a candidate (m = N >= k next time)
  }
  const val = scratch.abs, idx = scratch.candIdx;
  const sel = scratch.selBuf(m);
  sel.set(val.subarray(0, m));
  const thr = quickselect(sel, m, k); // the k-th smallest |c| overall (all smaller ones are candidates)
  scratch.lastThr = thr;
  if (scratch.del.length < k) scratch.del = new Int32Array(Math.ceil(k * 1.5));
  const del = scratch.del;
  let nDel = 0;
  for (let c = 0; c < m && nDel < k; c++) if (val[c] < thr) del[nDel++] = idx[c];
  for (let c = 0; c < m && nDel < k; c++) if (val[c] === thr) del[nDel++] = idx[c];
  // few removals keep the hash table valid by swap-removal, many compact and rebuild it
  removeIndices(sum, del, nDel, st, scratch);
}

/** The k-th smallest (1-based k) of a[0..n), reordering a. */
function quickselect(a: Float64Array, n: number, k: number): number {
  let lo = 0, hi = n - 1;
  const target = k - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >>> 1];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i]; a[i] = a[j]; a[j] = t;
        i++; j--;
      }
    }
    if (target <= j) hi = j;
    else if (target >= i) lo = i;
    else return a[target];
  }
  return a[target];
}
