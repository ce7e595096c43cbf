/**
 * The challenge document's types (schemas/challenge.schema.json), apart from the validator in
 * challenge.ts, so that compile.ts can use them without importing the validator (which imports
 * compile.ts).
 */
import type { GateName } from './circuit';
import type { LatticeSpec } from './lattices';
import type { ObservableJson } from './observable';

export interface KickedIsingCircuitJson {
  family: 'kicked-ising';
  /** default -pi/2 */
  thetaJ?: number;
  steps: number[];
  thetaH: number[];
}

export interface GateJson {
  name: GateName;
  qubits: number[];
  params?: number[];
}

export interface GatesCircuitJson {
  family: 'gates';
  qubits: number;
  gates: GateJson[];
}

export interface ChallengeSpec {
  $schema?: string;
  id: string;
  version: number;
  title: string;
  description: string;
  license?: string;
  tags?: string[];
  citation?: string;
  lattice: LatticeSpec;
  circuit: KickedIsingCircuitJson | GatesCircuitJson;
  observables: ObservableJson[];
}
