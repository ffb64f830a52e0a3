/**
 * The words the engine, the rulesets and the forms share: gate kinds, hazard areas, walk-through
 * sections, severities, outcomes and verdicts. One list each, so a typo in a ruleset file is a
 * validation error, not a silently ignored rule.
 */
import type { GateKind as CalculatorGateKind } from './calculators/gate-kind';

/** How the gate moves. */
export const GATE_KINDS = [
  'swing',
  'slide',
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
] as const;
export type GateKind = (typeof GATE_KINDS)[number];

// The calculators and the engine must name the same gates.
const sameGateKinds: [GateKind] extends [CalculatorGateKind]
  ? [CalculatorGateKind] extends [GateKind]
    ? true
    : never
  : never = true;
void sameGateKinds;

/** UL 325 usage class (I residential … IV supervised restricted access), also used to size HRN exposure in Europe. */
export const USAGE_CLASSES = [1, 2, 3, 4] as const;
export type UsageClass = (typeof USAGE_CLASSES)[number];

/**
 * Hazard areas findings are grouped and scored by. `handover` is its own area: those items are
 * an installer's good practice rather than a standard's requirement, and keeping them apart stops
 * them diluting (or propping up) the standards-based areas.
 */
export const HAZARD_AREAS = [
  'pinch',
  'gaps',
  'signage',
  'force',
  'sensing',
  'controls',
  'build',
  'power',
  'handover',
] as const;
export type HazardArea = (typeof HAZARD_AREAS)[number];

/** Walk-through sections, in the order an auditor meets them walking up to and around a gate. */
export const WALK_SECTIONS = [
  'approach_signs',
  'construction',
  'hinge_side',
  'closing_edge',
  'operator_arm',
  'fixed_objects',
  'controls',
  'sensing',
  'force_test',
  'power_wiring',
  'handover',
] as const;
export type WalkSection = (typeof WALK_SECTIONS)[number];

/** How bad a failed rule is; drives the verdict and the area-score weights. */
export const SEVERITIES = ['critical', 'major', 'minor'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** A rule's outcome for one gate. */
export const OUTCOMES = ['pass', 'fail', 'n/a', 'needs_info'] as const;
export type Outcome = (typeof OUTCOMES)[number];

/**
 * The three verdicts: `withdraw` take the gate out of automatic operation until fixed;
 * `remedy` fix by a date; `clear` nothing above minor fails.
 */
export const VERDICTS = ['clear', 'remedy', 'withdraw'] as const;
export type Verdict = (typeof VERDICTS)[number];

/** Auditor answers to a yes/no question; `na` means the question does not apply at this gate. */
export const YES_NO_NA = ['yes', 'no', 'na'] as const;
export type YesNoNa = (typeof YES_NO_NA)[number];

/** Direction of travel, for entrapment protection and force tests. */
export const TRAVEL_DIRECTIONS = ['closing', 'opening'] as const;
export type TravelDirection = (typeof TRAVEL_DIRECTIONS)[number];

/** Keys of questions, measurements and params: camelCase, so they read well as fact paths (`m.hingeGapMm`). */
export const KEY_PATTERN = /^[a-z][a-zA-Z0-9]{1,63}$/;
