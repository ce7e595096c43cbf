/**
 * The planner's light cones: every cone comes from shared/physics/light-cone.ts (lightCone and its
 * counting variants); this module only caches them per (steps, support), so a 1,000-target plan
 * takes milliseconds. The cones are exact restrictions (the gates left out commute with the evolved
 * observable) and upper bounds on the true support.
 */
import type { CompiledCircuit, ObservableSpec, PauliTerm } from '../circuit';
import type { ValidatedChallenge } from '../challenge';
import { compileInstance, type CompiledLattice, type Instance } from '../compile';
import { GateConeCounter, isCliffordAngle, KickedIsingCones, lightCone, type ConeCount, type ConeWalkHooks, type KickedIsingCone } from '../light-cone';
import type { PlannerOptions } from './options';
import type { ConeStats } from './types';

/** A kicked-Ising cone at one step count: a prefix (`blocksLen` numbers) of a longer walk's blocks. */
export interface StepCone {
  qubits: number;
  rx: number;
  rzz: number;
  blocks: number[];
  blocksLen: number;
}

/** Cache key of one Pauli term's support (qubits and whether each is Z or X/Y). */
export function termKey(t: PauliTerm): string {
  let s = '';
  for (const f of t.factors) s += `${f.op === 'Z' ? 'z' : 'x'}${f.qubit},`;
  return s;
}

export class PlannerCones {
  /** the compiled circuit of the gates family (one instance), null for kicked-ising */
  readonly gatesCircuit: CompiledCircuit | null;
  private counter: GateConeCounter | null = null;
  private kicked: KickedIsingCones | null = null;
  private readonly gateCache = new Map<string, ConeCount>();
  private readonly stepCache = new Map<string, StepCone>();
  private readonly fullCache = new Map<string, KickedIsingCone>();
  private readonly maxSteps: number;

  constructor(
    readonly challenge: ValidatedChallenge,
    readonly lattice: CompiledLattice,
  ) {
    const c = challenge.spec.circuit;
    this.gatesCircuit = c.family === 'gates' ? compileInstance(challenge.spec, challenge.instances[0]) : null;
    this.maxSteps = c.family === 'kicked-ising' ? Math.max(...c.steps) : 0;
  }

  private kickedCones(): KickedIsingCones {
    if (!this.kicked) this.kicked = new KickedIsingCones(this.lattice);
    return this.kicked;
  }

  /** Gates family: the counting walk of lightCone over the one compiled circuit, with optional hooks. */
  countGates(terms: readonly PauliTerm[], hooks?: ConeWalkHooks): ConeCount {
    if (!this.gatesCircuit) throw new Error('not a gates-family challenge');
    if (!this.counter) this.counter = new GateConeCounter(this.gatesCircuit);
    return this.counter.count(terms, hooks);
  }

  /** Light-cone statistics of a set of terms (their union) in one instance; `key` names the set. */
  coneStats(inst: Instance, terms: readonly PauliTerm[], key: string): ConeStats {
    if (this.gatesCircuit) {
      let c = this.gateCache.get(key);
      if (!c) {
        c = this.countGates(terms);
        this.gateCache.set(key, c);
      }
      return { qubits: c.qubits, gates: c.gates, nonClifford: c.nonClifford };
    }
    if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
    const { steps, thetaH, thetaJ } = inst.params;
    const raw = this.stepCone(steps, terms, key);
    const nonClifford = (isCliffordAngle(thetaH) ? 0 : raw.rx) + (isCliffordAngle(thetaJ) ? 0 : raw.rzz);
    return { qubits: raw.qubits, gates: raw.rx + raw.rzz, nonClifford: steps === 0 ? 0 : nonClifford };
  }

  /**
   * Kicked-Ising cone of `terms` at `steps`, from one walk at the grid's largest step count: the
   * walk for t steps is the first 6t block entries of the walk for more steps, so one breadth-first
   * search per support serves every t.
   */
  stepCone(steps: number, terms: readonly PauliTerm[], key: string): StepCone {
    const T = Math.max(this.maxSteps, steps);
    const k = `${steps}|${key}`;
    let raw = this.stepCache.get(k);
    if (raw) return raw;
    const fk = `${T}|${key}`;
    let full = this.fullCache.get(fk);
    if (!full) {
      full = this.kickedCones().walk(T, terms);
      this.fullCache.set(fk, full);
    }
    if (steps === T) raw = { ...full, blocksLen: full.blocks.length };
    else if (steps === 0) {
      const q = new Set<number>();
      for (const t of terms) for (const f of t.factors) q.add(f.qubit);
      raw = { qubits: q.size, rx: 0, rzz: 0, blocks: [], blocksLen: 0 };
    } else {
      const b = full.blocks;
      const len = 6 * steps;
      let rx = 0;
      let rzz = 0;
      for (let i = 0; i < len; i += 3) {
        if (b[i] === 1) rx += b[i + 1];
        else rzz += b[i + 1];
      }
      raw = { qubits: b[len - 1], rx, rzz, blocks: b, blocksLen: len };
    }
    this.stepCache.set(k, raw);
    return raw;
  }

  /** Gates in the whole circuit of an instance. */
  totalGates(inst: Instance): number {
    if (this.gatesCircuit) return this.gatesCircuit.gates.length;
    if (inst.params.family !== 'kicked-ising') return 0;
    return inst.params.steps * (this.lattice.graph.n + this.lattice.graph.edges.length);
  }

  /**
   * The light-cone sub-circuit of an observable in an instance, on qubits re-indexed 0..k-1 (in
   * increasing original order), with the observable re-indexed the same way. Exact: the gates left
   * out commute with the Heisenberg-evolved observable.
   */
  restrict(inst: Instance, obs: ObservableSpec): { circuit: CompiledCircuit; observable: ObservableSpec; qubits: number[] } {
    if (this.gatesCircuit) {
      const lc = lightCone(this.gatesCircuit, obs);
      return { circuit: lc.circuit, observable: lc.observable as ObservableSpec, qubits: lc.qubits };
    }
    if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
    return this.kickedCones().restrict(inst.params, obs);
  }
}

/** What every estimator is given for one target. */
export interface EstimateInput {
  challenge: ValidatedChallenge;
  options: Required<PlannerOptions>;
  cones: PlannerCones;
  inst: Instance;
  obs: ObservableSpec;
  /** the observable's union light cone */
  union: ConeStats;
}
