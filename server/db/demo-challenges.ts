/**
 * The demo challenges. INVENTED for the demo: the lattices (a ring, a square lattice with a vacancy,
 * and the "braid", an edge-list lattice of Parallax's own design), the angles, step grids and
 * observables were chosen for this scenario; none re-enacts a published experiment.
 *
 * Each challenge shows one regime: the ring is mostly within reach of exact methods (calibration);
 * the vacancy lattice is two-dimensional and deep, so past the first few steps no exact method
 * reaches and the targets are scored against the consensus; the braid is of utility scale (128
 * qubits, up to 20 steps), with exact references only for its shallowest instances.
 */
import type { ChallengeSpec } from '@shared/physics/challenge';

/** Open rows x cols square grid (qubit r * cols + c) without the couplings of the `vacant` qubits. */
export function squareWithVacancies(rows: number, cols: number, vacant: number[]): [number, number][] {
  const gone = new Set(vacant);
  const edges: [number, number][] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const q = r * cols + c;
      if (c + 1 < cols) edges.push([q, q + 1]);
      if (r + 1 < rows) edges.push([q, q + cols]);
    }
  }
  return edges.filter(([a, b]) => !gone.has(a) && !gone.has(b));
}

/**
 * The braid: an inner ring 0..m-1 and an outer ring m..2m-1, a rung (i, m+i) at every even i, and
 * a skew link (i, m + (i+3) mod m) at every i = 1 mod 4. Degree 2 to 4; 2m qubits, 2m + m/2 + m/4 couplings.
 */
export function braidEdges(m: number): [number, number][] {
  const edges: [number, number][] = [];
  for (let i = 0; i < m; i++) {
    edges.push([i, (i + 1) % m]);
    edges.push([m + i, m + ((i + 1) % m)]);
    if (i % 2 === 0) edges.push([i, m + i]);
    if (i % 4 === 1) edges.push([i, m + ((i + 3) % m)]);
  }
  return edges;
}

/**
 * Per-challenge cap on the estimated seconds of one exact reference (challenges.settings
 * referenceSecondsBudget; the server's REFERENCE_SECONDS_BUDGET still applies when smaller), so that
 * the seed's background work stays short on a laptop.
 */
export const DEMO_REFERENCE_BUDGET: Record<string, number> = {
  // large enough for every tensor-network target the planner estimates within them on the
  // reference job's slice threads (the ring's 10-step correlators; the vacancy lattice's 6-step Z15
  // and ZZ and 8-step Z35; the braid's 8-step rung correlator and energy): every demo target whose
  // network has width <= 28 gets an exact value. Measured 2026-12-05 on two threads: the vacancy
  // lattice's six widest take 35 to 75 s each, the braid's two 8-step energies about 2 min each;
  // about ten minutes of background work on a first start
  'ring-36-correlators': 10,
  'vacancy-square-6x6': 120,
  'braid-128': 300,
};

export const DEMO_SPECS: ChallengeSpec[] = [
  {
    id: 'ring-36-correlators',
    version: 1,
    title: 'Ring of 36, correlators and a string',
    description: 'A periodic ring of 36 qubits under the kicked Ising circuit with a weaker coupling angle: per Trotter step RX(thetaH) on every qubit, then RZZ(thetaJ = -1.0) on every bond. Two-point correlators at distances 1, 3 and 6, a six-site Z string and the energy of one bond. Light cones stay narrow in one dimension, so most targets have exact references: a calibration ground where honest error bars should cover the reference about 95% of the time.',
    license: 'CC-BY-4.0',
    tags: ['ring', 'correlators', 'calibration'],
    lattice: { kind: 'ring', n: 36 },
    circuit: { family: 'kicked-ising', thetaJ: -1.0, steps: [1, 2, 3, 4, 5, 6, 8, 10], thetaH: [0.25, 0.55, 0.85, 1.15] },
    observables: [
      { id: 'zz1', label: 'two-point correlator, distance 1', pauli: 'Z0 Z1' },
      { id: 'zz3', label: 'two-point correlator, distance 3', pauli: 'Z0 Z3' },
      { id: 'zz6', label: 'two-point correlator, distance 6', pauli: 'Z0 Z6' },
      { id: 'zstring6', label: 'Z string over sites 0-5', pauli: 'Z0 Z1 Z2 Z3 Z4 Z5' },
      { id: 'e01', label: 'energy of bond (0, 1): -Z0Z1 - 0.25 (X0 + X1)', terms: [{ coef: -1, pauli: 'Z0 Z1' }, { coef: -0.25, pauli: 'X0' }, { coef: -0.25, pauli: 'X1' }] },
    ],
  },
  {
    id: 'vacancy-square-6x6',
    version: 1,
    title: 'Square lattice 6 x 6 with a vacancy, deep quench',
    description: 'A 6 x 6 square lattice whose qubit 14 (row 2, column 2, counting from 0) is a vacancy: its four couplings are removed, so it only turns under RX. Kicked Ising with thetaJ = -0.7 up to 16 Trotter steps. The light cones of a two-dimensional lattice outgrow every exact method after a few steps: the shallow targets are exact, the deep ones are scored against the consensus of the entries, with its chi-squared and Birge ratio shown.',
    license: 'CC-BY-4.0',
    tags: ['square', 'defect', 'consensus'],
    lattice: { kind: 'edges', n: 36, edges: squareWithVacancies(6, 6, [14]) },
    circuit: { family: 'kicked-ising', thetaJ: -0.7, steps: [1, 2, 3, 4, 6, 8, 12, 16], thetaH: [0.3, 0.7, 1.1] },
    observables: [
      { id: 'z15', label: 'magnetisation beside the vacancy', pauli: 'Z15' },
      { id: 'z35', label: 'magnetisation at the far corner', pauli: 'Z35' },
      { id: 'zz20_21', label: 'two-point correlator across the bond (20, 21)', pauli: 'Z20 Z21' },
      { id: 'row3', label: 'Z string along row 3', pauli: 'Z18 Z19 Z20 Z21 Z22 Z23' },
    ],
  },
  {
    id: 'braid-128',
    version: 1,
    title: 'Braid of 128 qubits, up to 20 steps',
    description: 'Parallax\'s own lattice: two rings of 64 qubits (inner 0-63, outer 64-127) joined by a rung at every even site and a skew link from every inner site 1 mod 4 to the outer site three further on (176 couplings, degree 2 to 4). Kicked Ising with thetaJ = -0.6 up to 20 Trotter steps: a utility-scale instance where exact references exist for the shallowest steps only, and the rest is a question for the methods.',
    license: 'CC-BY-4.0',
    tags: ['edge-list', 'utility-scale', 'consensus'],
    lattice: { kind: 'edges', n: 128, edges: braidEdges(64) },
    circuit: { family: 'kicked-ising', thetaJ: -0.6, steps: [1, 2, 3, 4, 6, 8, 12, 16, 20], thetaH: [0.4, 1.0] },
    observables: [
      { id: 'zz_rung10', label: 'two-point correlator across the rung (10, 74)', pauli: 'Z10 Z74' },
      { id: 'e_rung10', label: 'energy of the rung (10, 74): -Z10Z74 - 0.5 (X10 + X74)', terms: [{ coef: -1, pauli: 'Z10 Z74' }, { coef: -0.5, pauli: 'X10' }, { coef: -0.5, pauli: 'X74' }] },
    ],
  },
];
