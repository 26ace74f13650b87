/**
 * Public API of the Orrery computation core. Pure TypeScript (mathjs and zod only): runs in
 * a browser Web Worker, Node worker threads and the CLI.
 *
 * Conventions used by every export: qubits are {register, index} in documents and flat indices
 * (register offset + index) in lowered circuits, index 0 = least-significant bit, and flat
 * qubit q is bit q of a state-vector index; angles are turns (1 turn = 2π rad) unless a name
 * says radians; document angle strings are radian expressions or `"<expr> turn"`.
 */
export * from './angle.js';
export * from './circuit.js';
export * from './schema.js';
export * from './lower.js';
export * from './expect.js';
export * from './ledger.js';
export * from './amplitudes.js';
export * from './run.js';
export * from './inputs.js';
