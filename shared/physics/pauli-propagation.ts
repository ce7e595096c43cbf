/** The Pauli-propagation engine lives in shared/physics/pauli-propagation/ (see its index.ts); this file keeps the old import path. */
export * from './pauli-propagation/index';
