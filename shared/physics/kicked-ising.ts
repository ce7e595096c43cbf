/**
 * The kicked transverse-field Ising family (PHYSICS.md): starting from |0...0>, each step applies
 * RX(thetaH) on every qubit (one 'rx' layer), then RZZ(thetaJ) on every edge, one 'rzz' layer per
 * edge colour. RX(t) = exp(-i t X/2), RZZ(t) = exp(-i t Z(x)Z/2); thetaJ defaults to -pi/2.
 * (PRODUCT.md lists the RZZ layers first; PHYSICS.md and the challenge format fix RX first, so the
 * final ZZ layer commutes with Z-only observables.)
 */
import type { CompiledCircuit, Gate, Layer } from './circuit';
import type { Edge } from './lattices';

export const DEFAULT_THETA_J = -Math.PI / 2;

export interface KickedIsingParams {
  steps: number;
  thetaH: number;
  thetaJ: number;
}

/**
 * @param nQubits qubit count
 * @param colourLayers edges grouped in colour layers (lattices.edgeColouring)
 */
export function kickedIsing(nQubits: number, colourLayers: readonly (readonly Edge[])[], p: KickedIsingParams): CompiledCircuit {
  const gates: Gate[] = [];
  const layers: Layer[] = [];
  const rx = [p.thetaH];
  const rzz = [p.thetaJ];
  for (let t = 0; t < p.steps; t++) {
    if (nQubits > 0) {
      const start = gates.length;
      for (let q = 0; q < nQubits; q++) gates.push({ name: 'rx', qubits: [q], params: rx });
      layers.push({ kind: 'rx', start, end: gates.length });
    }
    for (const layer of colourLayers) {
      if (layer.length === 0) continue;
      const start = gates.length;
      for (const [a, b] of layer) gates.push({ name: 'rzz', qubits: [a, b], params: rzz });
      layers.push({ kind: 'rzz', start, end: gates.length });
    }
  }
  return { nQubits, gates, layers };
}
