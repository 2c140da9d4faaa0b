/** linalg: complex dense matrices and the Hermitian eigensolver. No physics here. */
export * from './cmatrix.js';
export * from './subsystems.js';
export * from './eigh.js';
export * from './functions.js';
export * from './norms.js';
export * from './spectral.js';
export * from './graded.js';
