/**
 * The calculators of the rules engine in one import: pure functions from measurements to
 * JSON-ready facts that the compiled ruleset conditions judge.
 */
// Shared helpers first, then one module per calculator.
export * from './numbers';
export * from './limit-check';
export * from './gate-kind';
export * from './ul325-entrapment-types';
export * from './entrapment-protection';
export * from './force-trace';
export * from './swing-geometry';
export * from './power-wiring';
export * from './hrn';
