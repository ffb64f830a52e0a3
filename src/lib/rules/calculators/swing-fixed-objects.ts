/**
 * Clearance of an open swing gate from things around it (ASTM F2200), so the open leaf cannot
 * trap someone against a wall, fence or post.
 */
import { checkAtLeast, checkAtMost, combinePasses, type LimitCheck } from './limit-check';
import { optionalNonNegative } from './numbers';

/**
 * ASTM F2200, swing gates: an object covered by the open gate may reach at most 4 in
 * (101.6 mm, exact conversion) from the centre line of the pivot. Secondary source, verify
 * against the current edition.
 */
export const ASTM_F2200_COVERED_OBJECT_MAX_FROM_PIVOT_MM = 101.6; // 4 in

/**
 * ASTM F2200, swing gates: elsewhere the open gate stays at least 16 in (406.4 mm, exact
 * conversion) from any fixed object. Secondary source, verify against the current edition.
 */
export const ASTM_F2200_FIXED_OBJECT_MIN_DISTANCE_MM = 406.4; // 16 in

/** Limits a ruleset may pass instead of the ASTM F2200 defaults. */
export interface SwingClearanceLimits {
  coveredObjectMaxFromPivotMm: number;
  fixedObjectMinDistanceMm: number;
}

/** Clearances measured with the swing leaf fully open. */
export interface SwingClearanceInput {
  /** How far from the pivot centre line an object covered by the open leaf reaches; null if none measured. */
  coveredObjectFromPivotMm?: number | null;
  /** Smallest distance from the open leaf to a fixed object elsewhere; null if not measured. */
  fixedObjectDistanceMm?: number | null;
}

/** Each clearance check with its margin. */
export interface SwingClearanceResult {
  coveredObject: LimitCheck;
  fixedObject: LimitCheck;
  /** Both checks pass → true; any fails → false; otherwise null (needs information). */
  pass: boolean | null;
}

/** Judges the open swing leaf's clearances; margins are positive inside the limit. */
export function assessSwingClearance(
  input: SwingClearanceInput,
  limits: Partial<SwingClearanceLimits> = {},
): SwingClearanceResult {
  const coveredLimit = limits.coveredObjectMaxFromPivotMm ?? ASTM_F2200_COVERED_OBJECT_MAX_FROM_PIVOT_MM;
  const fixedLimit = limits.fixedObjectMinDistanceMm ?? ASTM_F2200_FIXED_OBJECT_MIN_DISTANCE_MM;
  const coveredObject = checkAtMost(
    optionalNonNegative('coveredObjectFromPivotMm', input.coveredObjectFromPivotMm),
    coveredLimit,
  );
  const fixedObject = checkAtLeast(
    optionalNonNegative('fixedObjectDistanceMm', input.fixedObjectDistanceMm),
    fixedLimit,
  );
  return { coveredObject, fixedObject, pass: combinePasses(coveredObject.pass, fixedObject.pass) };
}
