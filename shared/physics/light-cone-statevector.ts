/**
 * Exact value of an observable on a light-cone sub-circuit with the statevector engine.
 *
 * The planner (shared/physics/light-cone.ts, written separately) finds the cone and hands over a
 * sub-circuit whose gates act on k qubits re-indexed 0..k-1, with the observable re-indexed the
 * same way. This function only validates that contract and runs the statevector engine; it does
 * not depend on light-cone.ts.
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, ObservableSpec } from './circuit';
import {
  DEFAULT_MAX_QUBITS,
  type ProgressCallback,
  Statevector,
  checkQubitLimit,
  statevectorBytes,
} from './statevector';

export interface LightConeStatevectorOptions {
  /** qubit limit passed to the engine (default 26); a QubitLimitError is thrown above it */
  maxQubits?: number;
  onProgress?: ProgressCallback;
}

export interface LightConeStatevectorResult {
  /** sum_k coef_k <P_k> */
  value: number;
  /** <P_k> per term, without coefficients */
  termValues: number[];
  /** qubits simulated (the cone size) */
  nQubits: number;
  /** statevector memory used, 16 bytes per amplitude */
  bytes: number;
  /** wall time of the simulation and the expectation values, ms */
  elapsedMs: number;
}

/** Throws if the observable refers to a qubit outside the restricted sub-circuit. */
function checkRestricted(sub: CompiledCircuit, obs: ObservableSpec): void {
  const k = sub.nQubits;
  obs.terms.forEach((t, i) => {
    for (const f of t.factors) {
      if (!Number.isInteger(f.qubit) || f.qubit < 0 || f.qubit >= k) {
        throw new RangeError(
          `light-cone statevector: observable ${obs.id} term ${i} acts on qubit ${f.qubit}, outside the restricted sub-circuit's qubits 0..${k - 1}`,
        );
      }
    }
  });
}

/** Exact <obs> after the restricted sub-circuit, from |0...0> on its k qubits. */
export function lightConeStatevectorValue(
  sub: CompiledCircuit,
  obs: ObservableSpec,
  opts: LightConeStatevectorOptions = {},
): LightConeStatevectorResult {
  const maxQubits = opts.maxQubits ?? DEFAULT_MAX_QUBITS;
  checkQubitLimit(sub.nQubits, maxQubits);
  checkRestricted(sub, obs);
  const t0 = Date.now();
  const sv = Statevector.run(sub, { maxQubits, onProgress: opts.onProgress });
  const termValues = sv.termExpectations(obs);
  let value = 0;
  obs.terms.forEach((t, k) => (value += t.coef * termValues[k]));
  return { value, termValues, nQubits: sub.nQubits, bytes: statevectorBytes(sub.nQubits), elapsedMs: Date.now() - t0 };
}
