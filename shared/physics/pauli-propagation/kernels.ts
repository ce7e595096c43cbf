/** The gate kernels: Clifford rewrites, rotations (in place, paired), fused diagonal blocks. */
import type { Gate } from '../circuit';
import { popcount32 } from '../pauli';
import { cliffordQuarterTurns, type Stats } from './options';
import { ROTATION_GEN, angleOf, iGPSign, localAnticommutes, type LocalMap } from './algebra';
import { EMPTY, GOLDEN, PauliSum } from './sum';
import { Scratch } from './scratch';
import { grow, removeIndices, type Trunc } from './truncation';

const ACT_TABLES: Partial<Record<string, Int32Array>> = {};
for (const [name, gen] of Object.entries(ROTATION_GEN)) {
  const nq = name === 'rzz' ? 2 : 1;
  const t = new Int32Array(1 << (2 * nq));
  for (let c = 0; c < t.length; c++) t[c] = localAnticommutes(gen!, c, nq) ? iGPSign(gen!, c, nq) : 0;
  ACT_TABLES[name] = t;
}

const LOCAL_W = [0, 1, 1, 1, 1, 2, 2, 2, 1, 2, 2, 2, 1, 2, 2, 2];
const LOCAL_XY = [0, 1, 0, 1, 1, 2, 1, 2, 0, 1, 0, 1, 1, 2, 1, 2];

/** Apply a Clifford local map to every term in place. */
export function applyClifford(sum: PauliSum, g: Gate, map: LocalMap, tr: Trunc, st: Stats, scratch: Scratch): void {
  const nq = g.qubits.length;
  const ncodes = 1 << (2 * nq);
  const to = new Int32Array(ncodes);
  const sg = new Float64Array(ncodes);
  let trivial = true;
  for (let c = 0; c < ncodes; c++) {
    to[c] = map.to[c];
    sg[c] = map.sign[c];
    if (to[c] !== c || sg[c] !== 1) trivial = false;
  }
  if (trivial || sum.count === 0) return;
  const a = g.qubits[0];
  const b = nq === 2 ? g.qubits[1] : a;
  const W = sum.W, S = sum.S;
  const wa = a >>> 5, ba = a & 31, wb = b >>> 5, bb = b & 31;
  // hash deltas per code change: keys of flipped bits
  const hd = new Int32Array(ncodes);
  for (let c = 0; c < ncodes; c++) {
    const d = c ^ to[c];
    let h = 0;
    if (d & 1) h ^= sum.kx[a];
    if (d & 2) h ^= sum.kz[a];
    if (d & 4) h ^= sum.kx[b];
    if (d & 8) h ^= sum.kz[b];
    hd[c] = h;
  }
  const checkW = tr.maxWeight < Infinity || tr.maxXY < Infinity;
  const words = sum.words, coef = sum.coef, hash = sum.hash;
  const N = sum.count;
  let drop: Uint8Array | null = null;
  let changed = false;
  const ma = 1 << ba, mb = 1 << bb;
  for (let i = 0; i < N; i++) {
    const base = i * S;
    const xa = base + wa, za = base + W + wa, xb = base + wb, zb = base + W + wb;
    let code = ((words[xa] >>> ba) & 1) | (((words[za] >>> ba) & 1) << 1);
    if (nq === 2) code |= (((words[xb] >>> bb) & 1) << 2) | (((words[zb] >>> bb) & 1) << 3);
    const nc = to[code];
    if (nc !== code) {
      const d = code ^ nc;
      if (d & 1) words[xa] ^= ma;
      if (d & 2) words[za] ^= ma;
      if (d & 4) words[xb] ^= mb;
      if (d & 8) words[zb] ^= mb;
      hash[i] ^= hd[code];
      changed = true;
      if (checkW && (LOCAL_W[nc] > LOCAL_W[code] || LOCAL_XY[nc] > LOCAL_XY[code])) {
        if (sum.weightOf(i) > tr.maxWeight || sum.xyOf(i) > tr.maxXY) {
          if (!drop) drop = scratch.dropFlags(N);
          drop[i] = 1;
          st.droppedTerms++;
          st.droppedWeight += Math.abs(coef[i]);
        }
      }
    }
    if (sg[code] < 0) coef[i] = -coef[i];
  }
  if (changed) sum.tableStale = true;
  if (drop) sum.compact(drop);
}

/** Apply a non-Clifford rotation exp(-i t G / 2) in place. */
export function applyRotation(sum: PauliSum, g: Gate, tr: Trunc, st: Stats, scratch: Scratch): void {
  const gen = ROTATION_GEN[g.name]!;
  const nq = g.name === 'rzz' ? 2 : 1;
  const t = angleOf(g);
  const cs = Math.cos(t), sn = Math.sin(t);
  const act = ACT_TABLES[g.name]!;
  const a = g.qubits[0];
  const b = nq === 2 ? g.qubits[1] : a;
  const W = sum.W, S = sum.S;
  const wa = a >>> 5, ba = a & 31, wb = b >>> 5, bb = b & 31;
  // flip pattern of G over the S words, and its hash
  const flip = scratch.flipWords(S);
  let hG = 0;
  if (gen & 1) { flip[wa] ^= 1 << ba; hG ^= sum.kx[a]; }
  if (gen & 2) { flip[W + wa] ^= 1 << ba; hG ^= sum.kz[a]; }
  if (gen & 4) { flip[wb] ^= 1 << bb; hG ^= sum.kx[b]; }
  if (gen & 8) { flip[W + wb] ^= 1 << bb; hG ^= sum.kz[b]; }
  const fo: number[] = [];
  for (let k = 0; k < S; k++) if (flip[k] !== 0) fo.push(k);
  const nfo = fo.length;
  const fo0 = fo[0], fo1 = nfo > 1 ? fo[1] : fo[0];
  const fm0 = flip[fo0], fm1 = nfo > 1 ? flip[fo1] : 0;
  if (nfo > 2) throw new Error('internal: generator spans more than two words');
  // anticommutation test: parity of the P bits complementary to G's bits (<= 2 tests here)
  const tOff: number[] = [], tSh: number[] = [];
  if (gen & 1) { tOff.push(W + wa); tSh.push(ba); }
  if (gen & 2) { tOff.push(wa); tSh.push(ba); }
  if (gen & 4) { tOff.push(W + wb); tSh.push(bb); }
  if (gen & 8) { tOff.push(wb); tSh.push(bb); }
  if (tOff.length > 2) throw new Error('internal: generator with more than two test bits');
  const two = tOff.length === 2;
  const o1 = tOff[0], s1 = tSh[0], o2 = two ? tOff[1] : tOff[0], s2 = two ? tSh[1] : 0;
  const checkW = tr.maxWeight < Infinity || tr.maxXY < Infinity;
  const delta = tr.delta;

  if (sum.tableStale) sum.rebuildTable();
  const N0 = sum.count;
  let nDel = 0;
  let del = scratch.del;
  let words = sum.words, coef = sum.coef, hash = sum.hash, mark = sum.mark, slots = sum.slots;
  let mask = slots.length - 1, shift = sum.shift, cap = sum.cap;
  let m = N0;
  for (let i = 0; i < N0; i++) {
    const base = i * S;
    const anti = two
      ? ((words[base + o1] >>> s1) ^ (words[base + o2] >>> s2)) & 1
      : (words[base + o1] >>> s1) & 1;
    if (anti === 0) continue;
    if (mark[i] !== 0) {
      mark[i] = 0;
      continue;
    }
    let code = ((words[base + wa] >>> ba) & 1) | (((words[base + W + wa] >>> ba) & 1) << 1);
    if (nq === 2) code |= (((words[base + wb] >>> bb) & 1) << 2) | (((words[base + W + wb] >>> bb) & 1) << 3);
    const sigma = act[code];
    const hQ = hash[i] ^ hG;
    // probe for Q = P ^ G
    let s = Math.imul(hQ, GOLDEN) >>> shift;
    let j = -1;
    for (;;) {
      const jj = slots[s];
      if (jj === EMPTY) break;
      if (hash[jj] === hQ) {
        const jb = jj * S;
        let k = 0;
        while (k < S && (words[jb + k] ^ words[base + k] ^ flip[k]) === 0) k++; // int32 XOR: bit 31 safe
        if (k === S) {
          j = jj;
          break;
        }
      }
      s = (s + 1) & mask;
    }
    const ci = coef[i];
    if (j >= 0) {
      // pair (P_i, P_j = sigma i G P_i): both originals, j > i not yet processed
      const cj = coef[j];
      const ni = cs * ci - sigma * sn * cj;
      const nj = cs * cj + sigma * sn * ci;
      coef[i] = ni;
      coef[j] = nj;
      mark[j] = 1;
      if (ni < delta && ni > -delta) {
        if (nDel >= del.length) del = grow(del, scratch);
        del[nDel++] = i;
      }
      if (nj < delta && nj > -delta) {
        if (nDel >= del.length) del = grow(del, scratch);
        del[nDel++] = j;
      }
      continue;
    }
    const ni = cs * ci;
    const nQ = sigma * sn * ci;
    coef[i] = ni;
    if (ni < delta && ni > -delta) {
      if (nDel >= del.length) del = grow(del, scratch);
      del[nDel++] = i;
    }
    let keep = !(nQ < delta && nQ > -delta);
    if (keep && checkW) {
      let wq = 0, xq = 0;
      for (let k = 0; k < W; k++) {
        const xw = words[base + k] ^ flip[k];
        wq += popcount32(xw | (words[base + W + k] ^ flip[W + k]));
        xq += popcount32(xw);
      }
      keep = wq <= tr.maxWeight && xq <= tr.maxXY;
    }
    if (!keep) {
      st.droppedTerms++;
      st.droppedWeight += Math.abs(nQ);
      continue;
    }
    if (m === cap) {
      sum.count = m;
      sum.reserve(m + 1); // may rebuild the table: re-probe for an empty slot
      words = sum.words; coef = sum.coef; hash = sum.hash; mark = sum.mark; slots = sum.slots;
      mask = slots.length - 1; shift = sum.shift; cap = sum.cap;
      s = Math.imul(hQ, GOLDEN) >>> shift;
      while (slots[s] !== EMPTY) s = (s + 1) & mask;
    }
    const nb = m * S;
    for (let k = 0; k < S; k++) words[nb + k] = words[base + k];
    words[nb + fo0] ^= fm0;
    if (nfo > 1) words[nb + fo1] ^= fm1;
    coef[m] = nQ;
    hash[m] = hQ;
    mark[m] = 0;
    slots[s] = m;
    m++;
  }
  sum.count = m;
  flip.fill(0);
  if (m > st.peakTerms) st.peakTerms = m;
  const b0 = sum.storageBytes();
  if (b0 > st.peakBytes) st.peakBytes = b0;
  if (nDel > 0) removeIndices(sum, del, nDel, st, scratch);
}

/**
 * A run of consecutive diagonal Clifford gates (rzz / rz at multiples of pi/2, cz, z, s, sdg).
 * They commute, so their Heisenberg maps can be applied in any order; a string is touched only by
 * gates that anticommute with it, each of which has a qubit with x = 1. Per qubit a (CSR):
 * entries (partner b or -1, quarter turns k) of the Z_a Z_b or Z_a rotations exp(-i k pi/4 G).
 */
interface DiagBlock {
  start: Int32Array;
  partner: Int32Array;
  pWord: Int32Array;
  pShift: Int32Array;
  k: Int32Array;
  hkey: Int32Array;
}

const DIAG_CLIFFORD_1Q: Partial<Record<string, number>> = { z: 2, s: 1, sdg: 3 };

/** Quarter turns of a diagonal Clifford gate, as [qubits, k] rotation pieces; null if not one. */
export function diagonalPieces(g: Gate): [number, number, number][] | null {
  const fixed = DIAG_CLIFFORD_1Q[g.name];
  if (fixed !== undefined) return [[g.qubits[0], -1, fixed]];
  if (g.name === 'cz') return [[g.qubits[0], -1, 1], [g.qubits[1], -1, 1], [g.qubits[0], g.qubits[1], 3]];
  if (g.name === 'rz' || g.name === 'rzz') {
    const k = cliffordQuarterTurns(angleOf(g));
    if (k < 0) return null;
    return g.name === 'rz' ? [[g.qubits[0], -1, k]] : [[g.qubits[0], g.qubits[1], k]];
  }
  return null;
}

export function buildDiagBlock(n: number, pieces: [number, number, number][], kz: Int32Array): DiagBlock {
  // merge pieces on the same qubit / edge (rotations about the same generator add)
  const acc = new Map<string, [number, number, number]>();
  for (const [a, b, k] of pieces) {
    const lo = b < 0 ? a : Math.min(a, b), hi = b < 0 ? -1 : Math.max(a, b);
    const key = `${lo},${hi}`;
    const e = acc.get(key);
    if (e) e[2] = (e[2] + k) % 4;
    else acc.set(key, [lo, hi, k % 4]);
  }
  const per: [number, number][][] = Array.from({ length: n }, () => []);
  for (const [a, b, k] of acc.values()) {
    if (k === 0) continue;
    per[a].push([b, k]);
    if (b >= 0) per[b].push([a, k]);
  }
  let tot = 0;
  for (const l of per) tot += l.length;
  const blk: DiagBlock = {
    start: new Int32Array(n + 1),
    partner: new Int32Array(tot),
    pWord: new Int32Array(tot),
    pShift: new Int32Array(tot),
    k: new Int32Array(tot),
    hkey: new Int32Array(tot),
  };
  let e = 0;
  for (let a = 0; a < n; a++) {
    blk.start[a] = e;
    for (const [b, k] of per[a]) {
      blk.partner[e] = b;
      blk.pWord[e] = b >= 0 ? b >>> 5 : 0;
      blk.pShift[e] = b >= 0 ? b & 31 : 0;
      blk.k[e] = k;
      blk.hkey[e] = kz[a] ^ (b >= 0 ? kz[b] : 0);
      e++;
    }
  }
  blk.start[n] = e;
  return blk;
}

/** Apply a fused block of diagonal Clifford gates to every term in place. */
export function applyDiagBlock(sum: PauliSum, blk: DiagBlock, tr: Trunc, st: Stats, scratch: Scratch): void {
  const N = sum.count;
  if (N === 0 || blk.partner.length === 0) return;
  const W = sum.W, S = sum.S;
  const words = sum.words, coef = sum.coef, hash = sum.hash;
  const start = blk.start, partner = blk.partner, pWord = blk.pWord, pShift = blk.pShift, kk = blk.k, hkey = blk.hkey;
  const checkW = tr.maxWeight < Infinity;
  let drop: Uint8Array | null = null;
  let changed = false;
  for (let i = 0; i < N; i++) {
    const base = i * S;
    let par = 0;
    let h = hash[i];
    let flippedB = false;
    for (let w = 0; w < W; w++) {
      let v = words[base + w] | 0;
      while (v !== 0) {
        const low = v & -v;
        v ^= low;
        const a = (w << 5) + 31 - Math.clz32(low);
        const e1 = start[a + 1];
        for (let e = start[a]; e < e1; e++) {
          const b = partner[e];
          const k = kk[e];
          if (b >= 0 && ((words[base + pWord[e]] >>> pShift[e]) & 1) !== 0) continue; // commutes
          if (k === 2) {
            par ^= 1;
            continue;
          }
          const zi = base + W + w;
          const za = (words[zi] & low) !== 0 ? 1 : 0;
          par ^= k === 1 ? za ^ 1 : za;
          words[zi] ^= low;
          if (b >= 0) {
            words[base + W + pWord[e]] ^= 1 << pShift[e];
            flippedB = true;
          }
          h ^= hkey[e];
          changed = true;
        }
      }
    }
    hash[i] = h;
    if (par !== 0) coef[i] = -coef[i];
    if (checkW && flippedB && sum.weightOf(i) > tr.maxWeight) {
      if (!drop) drop = scratch.dropFlags(N);
      drop[i] = 1;
      st.droppedTerms++;
      st.droppedWeight += Math.abs(coef[i]);
    }
  }
  if (changed) sum.tableStale = true;
  if (drop) sum.compact(drop);
}
