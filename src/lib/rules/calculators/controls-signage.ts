/**
 * Where the user controls sit and whether the gate carries its warning placards (UL 325
 * installation instructions), so nobody can work the gate from within its reach or unseen.
 */
import { checkAtLeast, combinePasses, type LimitCheck } from './limit-check';
import { optionalBoolean, optionalNonNegative } from './numbers';

/** UL 325 installation instructions: user controls at least 6 ft (1828.8 mm) from any moving part. Secondary source, verify. */
export const UL325_CONTROL_MIN_DISTANCE_MM = 1828.8; // 6 ft

/** UL 325: at least one warning placard on each side of the gate, at least two in all. Secondary source, verify. */
export const UL325_PLACARDS = Object.freeze({ minPerSide: 1, minTotal: 2 });

/** What the auditor records about the user controls. */
export interface ControlsInput {
  /** Distance from the user control to the nearest moving part of the gate, mm. */
  controlDistanceFromGateMm?: number | null;
  /** Someone at the control can reach over, under, around or through the gate. */
  canReachGateFromControl?: boolean | null;
  /** The gate is in sight from the control (reset / stop in line of sight). */
  inLineOfSight?: boolean | null;
}

/** Each control check, for findings and the report. */
export interface ControlsResult {
  distance: LimitCheck;
  noReachThrough: { pass: boolean | null };
  lineOfSight: { pass: boolean | null };
  pass: boolean | null;
}

/** Judges the placement of the user controls. */
export function assessControls(input: ControlsInput, limits: { minDistanceMm?: number } = {}): ControlsResult {
  const distance = checkAtLeast(
    optionalNonNegative('controlDistanceFromGateMm', input.controlDistanceFromGateMm),
    limits.minDistanceMm ?? UL325_CONTROL_MIN_DISTANCE_MM,
  );
  const canReach = optionalBoolean(input.canReachGateFromControl);
  const noReachThrough = { pass: canReach === null ? null : !canReach };
  const lineOfSight = { pass: optionalBoolean(input.inLineOfSight) };
  return {
    distance,
    noReachThrough,
    lineOfSight,
    pass: combinePasses(distance.pass, noReachThrough.pass, lineOfSight.pass),
  };
}

/** Placards counted on each side of the gate. */
export interface SignageInput {
  /** Placards visible from side 1 of the gate (count). */
  placardsGateSide1?: number | null;
  placardsGateSide2?: number | null;
}

/** Per side and total placard checks. */
export interface SignageResult {
  side1: { count: number | null; pass: boolean | null };
  side2: { count: number | null; pass: boolean | null };
  total: { count: number | null; pass: boolean | null };
  pass: boolean | null;
}

function countOf(name: string, value: number | null | undefined): number | null {
  const count = optionalNonNegative(name, value);
  if (count !== null && !Number.isInteger(count)) throw new RangeError(`${name} must be a whole number`);
  return count;
}

/** Judges warning placards: visible from each side, and enough in all. */
export function assessSignage(
  input: SignageInput,
  limits: Partial<{ minPerSide: number; minTotal: number }> = {},
): SignageResult {
  const minPerSide = limits.minPerSide ?? UL325_PLACARDS.minPerSide;
  const minTotal = limits.minTotal ?? UL325_PLACARDS.minTotal;
  const side1 = countOf('placardsGateSide1', input.placardsGateSide1);
  const side2 = countOf('placardsGateSide2', input.placardsGateSide2);
  const atLeast = (count: number | null, min: number) => (count === null ? null : count >= min);
  const total = side1 === null || side2 === null ? null : side1 + side2;
  const side1Pass = atLeast(side1, minPerSide);
  const side2Pass = atLeast(side2, minPerSide);
  // One side alone may already make up the total even while the other is still uncounted.
  const totalPass = atLeast(total, minTotal) ?? (Math.max(side1 ?? 0, side2 ?? 0) >= minTotal ? true : null);
  return {
    side1: { count: side1, pass: side1Pass },
    side2: { count: side2, pass: side2Pass },
    total: { count: total, pass: totalPass },
    pass: combinePasses(side1Pass, side2Pass, totalPass),
  };
}
