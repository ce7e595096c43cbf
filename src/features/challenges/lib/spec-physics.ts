/**
 * The challenge's physics in the browser, from the shared core only (no second copy of a rule):
 * observables parsed by shared/physics/observable.ts, instances compiled by shared/physics/compile.ts,
 * light cones by shared/physics/light-cone.ts.
 */
import type { ChallengeSpec } from '@shared/physics/challenge';
import type { ObservableSpec } from '@shared/physics/circuit';
import { compileInstance, compileLattice, enumerateInstances, type CompiledLattice } from '@shared/physics/compile';
import { lightCone } from '@shared/physics/light-cone';
import { parseObservable, type ObservableJson } from '@shared/physics/observable';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';

/** each observable of the challenge parsed with the one Pauli grammar; null where it does not parse */
export function parseObservables(c: { observables: ChallengeDetail['observables']; lattice: Pick<ChallengeDetail['lattice'], 'qubits'> }): Map<string, ObservableSpec | null> {
  const out = new Map<string, ObservableSpec | null>();
  for (const o of c.observables) {
    try {
      out.set(o.key, parseObservable({ ...(o.spec as ObservableJson), id: o.key }, c.lattice.qubits));
    } catch {
      out.set(o.key, null);
    }
  }
  return out;
}

/** the qubits an observable acts on */
export function supportOf(o: ObservableSpec | null | undefined): Set<number> {
  const s = new Set<number>();
  for (const t of o?.terms ?? []) for (const f of t.factors) s.add(f.qubit);
  return s;
}

/** instances larger than this are left to the server's light-cone endpoint */
export const BROWSER_CONE_GATE_LIMIT = 300_000;

const latticeCache = new WeakMap<object, CompiledLattice>();

/** The backward light cone of one target, computed in the browser by the shared rule. */
export function targetLightCone(spec: ChallengeSpec, instanceKey: string, o: ObservableSpec): Set<number> | null {
  const inst = enumerateInstances(spec).find((i) => i.id === instanceKey);
  if (!inst) return null;
  let lat = latticeCache.get(spec);
  if (!lat && spec.circuit.family === 'kicked-ising') {
    lat = compileLattice(spec);
    latticeCache.set(spec, lat);
  }
  return new Set(lightCone(compileInstance(spec, inst, lat), o).qubits);
}
