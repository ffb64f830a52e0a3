/**
 * Top-view geometry of a linear (ram) operator on a swing leaf: how far the ram must extend,
 * which opening angles it can reach, how much leverage it has and how close its body comes to
 * the leaf — the numbers an installer checks before drilling the brackets.
 *
 * Frame: origin on the hinge axis; +x along the closed leaf; the leaf opens towards +y.
 * The operator's rear pivot sits at (−A, B): A back along the gate line from the hinge axis,
 * B across it. B > 0 puts the operator on the side the leaf opens to (pull to open, the ram
 * shortens as the gate opens); B < 0 on the other side (push to open).
 */
import { checkAtLeast, type LimitCheck } from './limit-check';
import {
  add,
  cross,
  direction,
  distance,
  hypot,
  point,
  scale,
  segmentDistance,
  segmentDistanceXY,
  subtract,
  toDegrees,
  toRadians,
  type Point,
} from './plane-geometry';
import { requireFinite, requireNonNegative, requirePositive, roundDeg, roundMm, roundTo } from './numbers';

/** Operator body at least 2 in (50.8 mm) from the leaf over the whole swing. Common practice, no source. */
export const OPERATOR_LEAF_MIN_CLEARANCE_MM = 50.8;

/** Angles are sampled every 0.5° for the charts and the smallest clearance / lever arm. */
export const SWING_GEOMETRY_ANGLE_STEP_DEG = 0.5;

/** Reachable angles are searched over a full half-turn of the leaf. */
const SWEEP_MAX_DEG = 180;

/** The installation as measured or planned, in the frame described above. */
export interface SwingOperatorGeometryInput {
  /** A: from the hinge axis back along the gate line to the operator's rear pivot, mm. */
  aMm: number;
  /** B: from the gate line across to the operator's rear pivot, mm (negative: operator on the far side). */
  bMm: number;
  /** Along the leaf from the hinge axis to the front (leaf) bracket pivot, mm. */
  bracketFromHingeMm: number;
  /** Pivot-to-pivot length with the ram fully retracted, mm. */
  retractedLengthMm: number;
  strokeMm: number;
  targetOpeningDeg: number;
  /** Front pivot's offset from the leaf centre line towards the operator, mm. Default 0. */
  bracketOffsetMm?: number;
  leafThicknessMm?: number;
  /** Half the width of the operator body seen from above, mm. Default 0 (its line of action). */
  operatorHalfWidthMm?: number;
  /** Length of the operator body from the rear pivot, mm. Default: the retracted length. */
  operatorBodyLengthMm?: number;
  angleStepDeg?: number;
}

/** Arrays over the swing, one entry per sampled angle, for charts in the walk-through and report. */
export interface SwingGeometryChart {
  angleDeg: number[];
  pivotToPivotMm: number[];
  /** Ram extension beyond fully retracted; negative or above the stroke where the ram cannot reach. */
  extensionMm: number[];
  leverArmMm: number[];
  clearanceMm: number[];
}

/** Summary figures for findings, plus the chart arrays. */
export interface SwingOperatorGeometryResult {
  closedPivotToPivotMm: number;
  openPivotToPivotMm: number;
  extensionAtClosedMm: number;
  extensionAtOpenMm: number;
  /** Stroke used between closed and the target opening. */
  strokeNeededMm: number;
  /** Angle ranges (0–180°) where retracted ≤ pivot-to-pivot ≤ retracted + stroke. */
  reachableRangesDeg: Array<{ fromDeg: number; toDeg: number }>;
  closedReachable: boolean;
  targetReachable: boolean;
  /** The ram reaches every angle from closed to the target opening. */
  swingReachable: boolean;
  /** First angle (0–180°) where the ram's line passes through the hinge axis (no leverage); null if none. */
  deadCentreDeg: number | null;
  passesDeadCentre: boolean;
  leverArmAtClosedMm: number;
  leverArmAtOpenMm: number;
  minLeverArmMm: number;
  minLeverArmAtDeg: number;
  minClearanceMm: number;
  minClearanceAtDeg: number;
  clearance: LimitCheck;
  chart: SwingGeometryChart;
}

interface Layout {
  rearPivot: Point;
  frontRadius: number;
  /** Angle of the front pivot ahead of the leaf line (bracket offset), degrees, signed towards the operator. */
  frontAngleOffsetDeg: number;
  side: 1 | -1;
  input: SwingOperatorGeometryInput;
}

function layoutOf(input: SwingOperatorGeometryInput): Layout {
  requireFinite('aMm', input.aMm);
  requireFinite('bMm', input.bMm);
  requirePositive('bracketFromHingeMm', input.bracketFromHingeMm);
  requirePositive('retractedLengthMm', input.retractedLengthMm);
  requirePositive('strokeMm', input.strokeMm);
  const offset = requireNonNegative('bracketOffsetMm', input.bracketOffsetMm ?? 0);
  const side = input.bMm < 0 ? -1 : 1;
  const rearPivot = point(-input.aMm, input.bMm);
  if (rearPivot.x === 0 && rearPivot.y === 0)
    throw new RangeError('The rear pivot cannot sit on the hinge axis');
  return {
    rearPivot,
    frontRadius: hypot(input.bracketFromHingeMm, offset),
    frontAngleOffsetDeg: side * toDegrees(Math.atan2(offset, input.bracketFromHingeMm)),
    side,
    input,
  };
}

function frontPivotAt(layout: Layout, angleDeg: number): Point {
  const { bracketFromHingeMm, bracketOffsetMm = 0 } = layout.input;
  return add(
    scale(direction(angleDeg), bracketFromHingeMm),
    scale(direction(angleDeg + 90), layout.side * bracketOffsetMm),
  );
}

/** Pivot-to-pivot distance at an opening angle (0 = closed), mm, unrounded. */
export function pivotToPivotMm(input: SwingOperatorGeometryInput, angleDeg: number): number {
  const layout = layoutOf(input);
  return distance(frontPivotAt(layout, angleDeg), layout.rearPivot);
}

/** Perpendicular distance from the hinge axis to the ram's line of action at an angle, mm, unrounded. */
export function leverArmMm(input: SwingOperatorGeometryInput, angleDeg: number): number {
  const layout = layoutOf(input);
  return leverArmAt(layout, frontPivotAt(layout, angleDeg));
}

function leverArmAt(layout: Layout, front: Point): number {
  return Math.abs(cross(layout.rearPivot, front)) / distance(front, layout.rearPivot);
}

function clearanceAt(layout: Layout, angleDeg: number, front: Point, leafLengthMm: number): number {
  const { input, rearPivot } = layout;
  const span = distance(front, rearPivot);
  const bodyLength = Math.min(input.operatorBodyLengthMm ?? input.retractedLengthMm, span);
  const bodyEnd = add(rearPivot, scale(subtract(front, rearPivot), bodyLength / span));
  const leafEnd = scale(direction(angleDeg), leafLengthMm);
  const gap = segmentDistance(rearPivot, bodyEnd, point(0, 0), leafEnd);
  return gap - (input.leafThicknessMm ?? 0) / 2 - (input.operatorHalfWidthMm ?? 0);
}

/** Angle between the rear pivot and the front pivot seen from the hinge, degrees (ψ). */
function pivotSeparationDeg(layout: Layout, angleDeg: number): number {
  const rearAngle = toDegrees(Math.atan2(layout.rearPivot.y, layout.rearPivot.x));
  return rearAngle - angleDeg - layout.frontAngleOffsetDeg;
}

/** Angles in [0, 180] where the ψ of the law of cosines equals ±γ (mod 360). */
function anglesWhereSeparationIs(layout: Layout, gammaDeg: number, period = 360): number[] {
  const base = pivotSeparationDeg(layout, 0);
  const found: number[] = [];
  for (const sign of [1, -1]) {
    for (let k = -3; k <= 3; k += 1) {
      const angle = base - sign * gammaDeg - k * period;
      if (angle >= 0 && angle <= SWEEP_MAX_DEG) found.push(angle);
    }
  }
  return found;
}

function reachableRanges(
  layout: Layout,
  shortest: number,
  longest: number,
): Array<{ fromDeg: number; toDeg: number }> {
  const R = hypot(layout.rearPivot.x, layout.rearPivot.y);
  const r = layout.frontRadius;
  // Law of cosines: L² = r² + R² − 2·r·R·cos ψ, so the angle where L hits a stroke end is ψ = ±acos(...).
  const gamma = (L: number) =>
    toDegrees(Math.acos(Math.min(1, Math.max(-1, (r * r + R * R - L * L) / (2 * r * R)))));
  const cuts = [
    0,
    SWEEP_MAX_DEG,
    ...anglesWhereSeparationIs(layout, gamma(shortest)),
    ...anglesWhereSeparationIs(layout, gamma(longest)),
  ]
    .sort((a, b) => a - b)
    .filter((angle, i, all) => i === 0 || angle - (all[i - 1] as number) > 1e-9);
  const lengthAt = (angle: number) => distance(frontPivotAt(layout, angle), layout.rearPivot);
  const tolerance = 1e-6;
  const ranges: Array<{ fromDeg: number; toDeg: number }> = [];
  for (let i = 1; i < cuts.length; i += 1) {
    const from = cuts[i - 1] as number;
    const to = cuts[i] as number;
    const middle = lengthAt((from + to) / 2);
    if (middle < shortest - tolerance || middle > longest + tolerance) continue;
    const previous = ranges[ranges.length - 1];
    if (previous && previous.toDeg === from) previous.toDeg = to;
    else ranges.push({ fromDeg: from, toDeg: to });
  }
  return ranges;
}

/**
 * cos and sin of the leaf direction and of the bracket-offset direction (90° on) at every angle of
 * the default grid, worked out once with the same expressions the sweep uses, so the sweep reads
 * the very same numbers instead of calling four trigonometric functions per angle.
 */
interface GridTrig {
  cos: Float64Array;
  sin: Float64Array;
  cosNormal: Float64Array;
  sinNormal: Float64Array;
}

let defaultGrid: GridTrig | null = null;

function defaultGridTrig(): GridTrig {
  if (!defaultGrid) {
    const count = Math.floor(SWEEP_MAX_DEG / SWING_GEOMETRY_ANGLE_STEP_DEG) + 1;
    const grid: GridTrig = {
      cos: new Float64Array(count),
      sin: new Float64Array(count),
      cosNormal: new Float64Array(count),
      sinNormal: new Float64Array(count),
    };
    for (let i = 0; i < count; i += 1) {
      const angle = i * SWING_GEOMETRY_ANGLE_STEP_DEG;
      grid.cos[i] = Math.cos(toRadians(angle));
      grid.sin[i] = Math.sin(toRadians(angle));
      grid.cosNormal[i] = Math.cos(toRadians(angle + 90));
      grid.sinNormal[i] = Math.sin(toRadians(angle + 90));
    }
    defaultGrid = grid;
  }
  return defaultGrid;
}

/** i × step from 0 up to (not including) the target, then the target itself. */
function sampledAngles(target: number, step: number): number[] {
  const angles: number[] = [];
  for (let i = 0; i * step < target - 1e-9; i += 1) angles.push(i * step);
  angles.push(target);
  return angles;
}

/** The summary figures without the chart arrays: what the rules read. */
export type SwingOperatorGeometrySummary = Omit<SwingOperatorGeometryResult, 'chart'>;

/** Works out ram length, reach, leverage and body clearance over the swing from closed to the target opening. */
export function assessSwingOperatorGeometry(
  input: SwingOperatorGeometryInput,
  limits: { minClearanceMm?: number } = {},
): SwingOperatorGeometryResult {
  const chart: SwingGeometryChart = {
    angleDeg: [],
    pivotToPivotMm: [],
    extensionMm: [],
    leverArmMm: [],
    clearanceMm: [],
  };
  return { ...sweepSwing(input, limits, chart), chart };
}

/**
 * The same figures as assessSwingOperatorGeometry without building the chart: scoring reads
 * only the summary and re-scores after every answer, so it skips a thousand rounded samples.
 */
export function summariseSwingOperatorGeometry(
  input: SwingOperatorGeometryInput,
  limits: { minClearanceMm?: number } = {},
): SwingOperatorGeometrySummary {
  return sweepSwing(input, limits, null);
}

function sweepSwing(
  input: SwingOperatorGeometryInput,
  limits: { minClearanceMm?: number },
  chart: SwingGeometryChart | null,
): SwingOperatorGeometrySummary {
  const layout = layoutOf(input);
  const target = requireFinite('targetOpeningDeg', input.targetOpeningDeg);
  if (target <= 0 || target > SWEEP_MAX_DEG)
    throw new RangeError('targetOpeningDeg must be above 0 and at most 180');
  const step = requirePositive('angleStepDeg', input.angleStepDeg ?? SWING_GEOMETRY_ANGLE_STEP_DEG);
  const shortest = input.retractedLengthMm;
  const longest = input.retractedLengthMm + input.strokeMm;
  const rearRadius = hypot(layout.rearPivot.x, layout.rearPivot.y);
  const leafLength = rearRadius + longest; // no part of the operator reaches beyond this along the leaf

  // One pass over the sampled angles; the first smallest value wins a tie.
  const angles = sampledAngles(target, step);
  let closed = 0;
  let open = 0;
  let firstLever = 0;
  let lastLever = 0;
  let minLever = 0;
  let minClear = 0;
  let minLeverValue = Infinity;
  let minClearValue = Infinity;
  // The per-angle figures on plain coordinates: the same arithmetic, in the same order, as
  // frontPivotAt, leverArmAt and clearanceAt, without building a dozen point objects per angle.
  const { x: rearX, y: rearY } = layout.rearPivot;
  const bracket = input.bracketFromHingeMm;
  const offset = layout.side * (input.bracketOffsetMm ?? 0);
  const bodyLengthMm = input.operatorBodyLengthMm ?? input.retractedLengthMm;
  // Every angle but the last (the target) is i × step: on the default grid its cos and sin are in the table.
  const grid = step === SWING_GEOMETRY_ANGLE_STEP_DEG ? defaultGridTrig() : null;
  for (let i = 0; i < angles.length; i += 1) {
    const angle = angles[i] as number;
    const onGrid = grid !== null && i < angles.length - 1;
    const cos = onGrid ? (grid.cos[i] as number) : Math.cos(toRadians(angle));
    const sin = onGrid ? (grid.sin[i] as number) : Math.sin(toRadians(angle));
    const frontX =
      cos * bracket + (onGrid ? (grid.cosNormal[i] as number) : Math.cos(toRadians(angle + 90))) * offset;
    const frontY =
      sin * bracket + (onGrid ? (grid.sinNormal[i] as number) : Math.sin(toRadians(angle + 90))) * offset;
    const length = hypot(frontX - rearX, frontY - rearY);
    const lever = Math.abs(rearX * frontY - rearY * frontX) / length;
    const bodyFraction = Math.min(bodyLengthMm, length) / length;
    const clearance =
      segmentDistanceXY(
        rearX,
        rearY,
        rearX + (frontX - rearX) * bodyFraction,
        rearY + (frontY - rearY) * bodyFraction,
        0,
        0,
        cos * leafLength,
        sin * leafLength,
      ) -
      (input.leafThicknessMm ?? 0) / 2 -
      (input.operatorHalfWidthMm ?? 0);
    if (i === 0) {
      closed = length;
      firstLever = lever;
    }
    open = length;
    lastLever = lever;
    if (i === 0 || lever < minLeverValue) {
      minLever = i;
      minLeverValue = lever;
    }
    if (i === 0 || clearance < minClearValue) {
      minClear = i;
      minClearValue = clearance;
    }
    if (chart) {
      chart.angleDeg.push(roundTo(angle, 3));
      chart.pivotToPivotMm.push(roundMm(length));
      chart.extensionMm.push(roundMm(length - shortest));
      chart.leverArmMm.push(roundMm(lever));
      chart.clearanceMm.push(roundMm(clearance));
    }
  }

  const ranges = reachableRanges(layout, shortest, longest);
  const within = (angle: number) =>
    ranges.some((range) => range.fromDeg <= angle + 1e-9 && angle - 1e-9 <= range.toDeg);
  const deadCentres = anglesWhereSeparationIs(layout, 0, 180).sort((a, b) => a - b);
  const deadCentre = deadCentres[0] ?? null;
  const minClearanceLimit = limits.minClearanceMm ?? OPERATOR_LEAF_MIN_CLEARANCE_MM;

  return {
    closedPivotToPivotMm: roundMm(closed),
    openPivotToPivotMm: roundMm(open),
    extensionAtClosedMm: roundMm(closed - shortest),
    extensionAtOpenMm: roundMm(open - shortest),
    strokeNeededMm: roundMm(Math.abs(closed - open)),
    reachableRangesDeg: ranges.map((range) => ({
      fromDeg: roundDeg(range.fromDeg),
      toDeg: roundDeg(range.toDeg),
    })),
    closedReachable: within(0),
    targetReachable: within(target),
    swingReachable: ranges.some((range) => range.fromDeg <= 1e-9 && range.toDeg >= target - 1e-9),
    deadCentreDeg: deadCentre === null ? null : roundDeg(deadCentre),
    passesDeadCentre: deadCentre !== null && deadCentre <= target,
    leverArmAtClosedMm: roundMm(firstLever),
    leverArmAtOpenMm: roundMm(lastLever),
    minLeverArmMm: roundMm(minLeverValue),
    minLeverArmAtDeg: roundDeg(angles[minLever] as number),
    minClearanceMm: roundMm(minClearValue),
    minClearanceAtDeg: roundDeg(angles[minClear] as number),
    clearance: checkAtLeast(minClearValue, minClearanceLimit),
  };
}
