/** Local Pauli algebra: products, anticommutation, Clifford maps derived from the rotation rule. */
import type { Gate } from '../circuit';
import { cliffordQuarterTurns } from './options';

// ---------------------------------------------------------------------------------------------
// Local (one- or two-qubit) Pauli algebra on codes: bit 0 = x_a, bit 1 = z_a, bit 2 = x_b,
// bit 3 = z_b.

/** i^e with P(g) P(p) = i^e P(g ^ p), for local codes over nq qubits. */
function localProductPhase(g: number, p: number, nq: number): number {
  let e = 0;
  for (let q = 0; q < nq; q++) {
    const gx = (g >> (2 * q)) & 1, gz = (g >> (2 * q + 1)) & 1;
    const px = (p >> (2 * q)) & 1, pz = (p >> (2 * q + 1)) & 1;
    e += gx * gz + px * pz + 2 * gz * px - (gx ^ px) * (gz ^ pz);
  }
  return ((e % 4) + 4) % 4;
}

export function localAnticommutes(g: number, p: number, nq: number): boolean {
  let par = 0;
  for (let q = 0; q < nq; q++) {
    const gx = (g >> (2 * q)) & 1, gz = (g >> (2 * q + 1)) & 1;
    const px = (p >> (2 * q)) & 1, pz = (p >> (2 * q + 1)) & 1;
    par ^= (gx & pz) ^ (gz & px);
  }
  return par === 1;
}

/** Sign s with i G P = s P(g ^ p), for anticommuting G, P (then i^{1+e} is real). */
export function iGPSign(g: number, p: number, nq: number): number {
  const e = (1 + localProductPhase(g, p, nq)) % 4;
  if (e !== 0 && e !== 2) throw new Error('internal: i G P is not Hermitian');
  return e === 0 ? 1 : -1;
}

/** A signed local map on codes: code -> (to[code], sign[code]). */
export interface LocalMap {
  to: number[];
  sign: number[];
}

function identityMap(nq: number): LocalMap {
  const m = 1 << (2 * nq);
  return { to: Array.from({ length: m }, (_, c) => c), sign: new Array<number>(m).fill(1) };
}

/** Heisenberg map of exp(-i k (pi/2) G / 2) on local codes. */
function cliffordRotationMap(g: number, k: number, nq: number): LocalMap {
  const m = identityMap(nq);
  for (let c = 0; c < m.to.length; c++) {
    if (!localAnticommutes(g, c, nq)) continue;
    if (k === 2) m.sign[c] = -1;
    else if (k === 1 || k === 3) {
      m.to[c] = c ^ g;
      m.sign[c] = iGPSign(g, c, nq) * (k === 3 ? -1 : 1);
    }
  }
  return m;
}

/** Heisenberg map of the time-ordered sequence [first, ..., last]: apply last's map first. */
function composeHeisenberg(seqTimeOrder: LocalMap[], nq: number): LocalMap {
  const out = identityMap(nq);
  for (let c = 0; c < out.to.length; c++) {
    let code = c;
    let s = 1;
    for (let i = seqTimeOrder.length - 1; i >= 0; i--) {
      s *= seqTimeOrder[i].sign[code];
      code = seqTimeOrder[i].to[code];
    }
    out.to[c] = code;
    out.sign[c] = s;
  }
  return out;
}

// Generators as local codes.
const GX = 0b01, GZ = 0b10, GY = 0b11;
const GZA = 0b0010, GZB = 0b1000;
const GZZ = GZA | GZB;
/** Promote a one-qubit code to qubit slot b of a two-qubit code. */
const onB = (g: number) => g << 2;

const R1 = (g: number, k: number) => cliffordRotationMap(g, k, 1);
const R2 = (g: number, k: number) => cliffordRotationMap(g, k, 2);

const CZ_SEQ = [R2(GZA, 1), R2(GZB, 1), R2(GZZ, 3)];
const H_T_SEQ = [R2(onB(GY), 1), R2(onB(GX), 2)];

/** Local Heisenberg maps of the fixed Clifford gates (a = first qubit, b = second). */
const CLIFFORD_MAPS: Partial<Record<string, LocalMap>> = {
  x: R1(GX, 2),
  y: R1(GY, 2),
  z: R1(GZ, 2),
  s: R1(GZ, 1),
  sdg: R1(GZ, 3),
  sx: R1(GX, 1),
  h: composeHeisenberg([R1(GY, 1), R1(GX, 2)], 1),
  cz: composeHeisenberg(CZ_SEQ, 2),
  cx: composeHeisenberg([...H_T_SEQ, ...CZ_SEQ, ...H_T_SEQ], 2),
};

export const ROTATION_GEN: Partial<Record<string, number>> = { rx: GX, ry: GY, rz: GZ, rzz: GZZ };

/**
 * The Heisenberg map U^dag P U of a single Clifford gate (or rotation at a Clifford angle) on the
 * local code of P; for tests and tools. Returns null for a non-Clifford rotation.
 */
export function cliffordLocalMap(gate: Gate): LocalMap | null {
  const fixed = CLIFFORD_MAPS[gate.name];
  if (fixed) return fixed;
  const g = ROTATION_GEN[gate.name];
  if (g === undefined) throw new Error(`unknown gate ${gate.name}`);
  const k = cliffordQuarterTurns(angleOf(gate));
  if (k < 0) return null;
  return cliffordRotationMap(g, k, gate.name === 'rzz' ? 2 : 1);
}

export function angleOf(g: Gate): number {
  const t = g.params?.[0];
  if (typeof t !== 'number' || !Number.isFinite(t)) throw new Error(`gate ${g.name} needs a finite angle`);
  return t;
}
