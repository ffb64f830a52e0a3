/**
 * Gate kinds and usage classes as the calculators know them, shared so that entrapment
 * protection and force limits speak of the same gates.
 */

/** The way the gate moves. */
export type GateKind =
  'swing' | 'slide' | 'barrier_arm' | 'vertical_lift' | 'vertical_pivot' | 'overhead_pivot';

/** Every gate kind, for input validation and pickers. */
export const GATE_KINDS: readonly GateKind[] = Object.freeze([
  'swing',
  'slide',
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
]);

/**
 * UL 325 usage class: 1 residential, 2 commercial / general access, 3 industrial / limited
 * access, 4 restricted access supervised by security staff. (UL 325 glossary; secondary source)
 */
export type UsageClass = 1 | 2 | 3 | 4;
