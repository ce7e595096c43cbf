/**
 * The compiled form every challenge instance reduces to, and the form every exact engine reads.
 * Plain data, no framework imports (shared/ is imported by client, server and scripts alike).
 *
 * Conventions (PHYSICS.md): qubits are 0-based; the state starts in |0...0>;
 * RX(t) = exp(-i t X / 2), RY(t) = exp(-i t Y / 2), RZ(t) = exp(-i t Z / 2),
 * RZZ(t) = exp(-i t Z(x)Z / 2); SX = sqrt(X) = e^{i pi/4} RX(pi/2).
 */

/** An angle in radians. Branded so that degrees or plain counts cannot be passed by mistake. */
export type Radians = number & { readonly __unit: 'rad' };
export const rad = (x: number): Radians => x as Radians;

export type OneQubitGateName = 'x' | 'y' | 'z' | 'h' | 's' | 'sdg' | 'sx' | 'rx' | 'ry' | 'rz';
export type TwoQubitGateName = 'rzz' | 'cx' | 'cz';
export type GateName = OneQubitGateName | TwoQubitGateName;

export const GATE_ARITY: Record<GateName, 1 | 2> = {
  x: 1, y: 1, z: 1, h: 1, s: 1, sdg: 1, sx: 1, rx: 1, ry: 1, rz: 1, rzz: 2, cx: 2, cz: 2,
};
export const GATE_PARAMS: Record<GateName, 0 | 1> = {
  x: 0, y: 0, z: 0, h: 0, s: 0, sdg: 0, sx: 0, rx: 1, ry: 1, rz: 1, rzz: 1, cx: 0, cz: 0,
};

export interface Gate {
  name: GateName;
  /** 1 or 2 qubit indices; for cx the first is the control. */
  qubits: readonly number[];
  /** Rotation angle for rx, ry, rz, rzz (radians); absent otherwise. */
  params?: readonly number[];
}

/**
 * A layer is a run of consecutive gates that mutually commute and act on disjoint qubits or are
 * all diagonal (an RZZ colour layer, an RX layer). Engines may use layers for fusion and light
 * cones; an engine that ignores them must still be correct on the flat gate list.
 */
export interface Layer {
  kind: 'rx' | 'rzz' | 'generic';
  /** index of the first gate of the layer in `gates` */
  start: number;
  /** one past the last gate */
  end: number;
}

export interface CompiledCircuit {
  nQubits: number;
  gates: Gate[];
  layers: Layer[];
}

/** One Pauli factor of a sparse Pauli string. */
export interface PauliFactor {
  qubit: number;
  op: 'X' | 'Y' | 'Z';
}

/** A term of an observable: coef times a Pauli string (identity on unlisted qubits). */
export interface PauliTerm {
  coef: number;
  factors: PauliFactor[];
}

/** An observable: a real-weighted sum of Pauli strings (Hermitian by construction). */
export interface ObservableSpec {
  id: string;
  terms: PauliTerm[];
}
