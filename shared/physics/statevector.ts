/** The statevector engine lives in shared/physics/statevector/ (see its index.ts); this file keeps the old import path. */
export * from './statevector/index';
