// Public surface of the estimators. Pure TypeScript (no I/O, no Node-only imports): safe for the
// web client, the server, the workers and the CLI. Internal helpers of a module (ambient-engine,
// ambient-filters, …) are reached through that module's public file.
export * from './types';
export * from './errors';
export * from './random';
// ring-down side: linear algebra, preprocessing, Prony, matrix pencil, ring-down fits
export * from './linalg';
export * from './preprocess';
export * from './prony';
export * from './matrix-pencil';
export * from './ringdown';
// ambient side: spectra, autoregressive models, windows and scans, tracks, damping bands
export * from './spectral';
export * from './ar';
export * from './ambient';
export * from './tracking';
export * from './bands';
// the Tarrow simulator and the PMU file formats
export * from './simulator';
export * from './formats';
