/**
 * The demo challenges. INVENTED for the demo: lattice sizes, step grids and observables were chosen
 * for this scenario and are not taken from any published experiment.
 */
import type { ChallengeSpec } from '@shared/physics/challenge';

const HALF_PI = Math.PI / 2;
const meanZ = (n: number) => ({ id: 'mz', terms: Array.from({ length: n }, (_, i) => ({ coef: 1 / n, pauli: `Z${i}` })) });

export const DEMO_SPECS: ChallengeSpec[] = [
  {
    id: 'kicked-chain-60',
    version: 1,
    title: 'Kicked Ising chain, 60 sites',
    description: 'An open chain of 60 qubits under the kicked transverse-field Ising circuit: per Trotter step RX(thetaH) on every qubit, then RZZ(-pi/2) on every bond. Exact values exist for every target (free fermions), so this challenge calibrates methods: honest error bars should cover the reference about 95% of the time.',
    license: 'CC-BY-4.0',
    tags: ['chain', 'free-fermion', 'calibration'],
    lattice: { kind: 'chain', n: 60 },
    circuit: { family: 'kicked-ising', thetaJ: -HALF_PI, steps: [1, 2, 3, 4, 6, 8, 10, 12], thetaH: [0, 0.25, 0.5, 0.75, 1.0, 1.25, HALF_PI] },
    observables: [
      { id: 'z29', pauli: 'Z29' },
      { id: 'z0', pauli: 'Z0' },
      { id: 'zz29', pauli: 'Z29 Z30' },
      meanZ(60),
    ],
  },
  {
    id: 'hex-patch-3x3',
    version: 1,
    title: 'Heavy-hex patch 3 x 3, deep quench',
    description: 'A 3 x 3 patch of heavy-hex cells (68 qubits, 76 bonds, three colour layers) driven by the kicked Ising circuit up to 16 Trotter steps. Shallow targets and Clifford points are exact; deep targets at generic angles have light cones far beyond brute force, and are scored against the consensus of the entries.',
    license: 'CC-BY-4.0',
    tags: ['heavy-hex', 'consensus'],
    lattice: { kind: 'heavy-hex', rows: 3, cols: 3 },
    circuit: { family: 'kicked-ising', thetaJ: -HALF_PI, steps: [1, 2, 3, 4, 6, 8, 12, 16], thetaH: [0, 0.3, 0.6, 0.9, HALF_PI] },
    observables: [
      { id: 'z33', pauli: 'Z33' },
      { id: 'w3', pauli: 'X32 Y33 Z34' },
    ],
  },
  {
    id: 'square-7x7-echo',
    version: 1,
    title: 'Square lattice 7 x 7, Z correlators',
    description: 'A 7 x 7 square lattice (four colour layers per step) up to 8 Trotter steps, with a centre spin and a nearest-neighbour correlator. Exact answers run out after a few steps; the rest is open.',
    license: 'CC-BY-4.0',
    tags: ['square', 'consensus'],
    lattice: { kind: 'square', rows: 7, cols: 7 },
    circuit: { family: 'kicked-ising', thetaJ: -HALF_PI, steps: [1, 2, 3, 4, 6, 8], thetaH: [0.4, 0.8, HALF_PI] },
    observables: [
      { id: 'z24', pauli: 'Z24' },
      { id: 'zz24', pauli: 'Z24 Z25' },
    ],
  },
];
