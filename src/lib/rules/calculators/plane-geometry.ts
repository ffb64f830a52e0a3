/**
 * Small top-view (2D) vector helpers for the swing-operator geometry: points, rotation and
 * distances between segments. Kept separate so the geometry module reads in the trade's terms.
 */

/** A point or vector in the top view, mm. */
export interface Point {
  x: number;
  y: number;
}

/** Builders and basic vector arithmetic. */
export const point = (x: number, y: number): Point => ({ x, y });
export const add = (a: Point, b: Point): Point => ({ x: a.x + b.x, y: a.y + b.y });
export const subtract = (a: Point, b: Point): Point => ({ x: a.x - b.x, y: a.y - b.y });
export const scale = (a: Point, k: number): Point => ({ x: a.x * k, y: a.y * k });
export const dot = (a: Point, b: Point): number => a.x * b.x + a.y * b.y;
/** z-component of the 3D cross product: signed area spanned by a and b. */
export const cross = (a: Point, b: Point): number => a.x * b.y - a.y * b.x;
/**
 * √(x² + y²) by the steps of V8's Math.hypot for two arguments (each magnitude divided by the
 * larger, squares summed, square root times the larger; its Kahan compensation is exactly 0 after
 * the first of two terms), so the result is bit-identical with Math.hypot(x, y), infinities and
 * NaN included (a unit test compares the two over a million pairs). The builtin copies its
 * arguments into a new array on every call; the swing sweep makes over a thousand calls per gate.
 */
export function hypot(x: number, y: number): number {
  const ax = Math.abs(x);
  const ay = Math.abs(y);
  if (ax === Infinity || ay === Infinity) return Infinity;
  if (Number.isNaN(ax) || Number.isNaN(ay)) return Number.NaN;
  const max = ax > ay ? ax : ay;
  if (max === 0) return 0;
  const nx = ax / max;
  const ny = ay / max;
  return Math.sqrt(nx * nx + ny * ny) * max;
}

/** Vector length and the distance between two points. */
export const length = (a: Point): number => hypot(a.x, a.y);
export const distance = (a: Point, b: Point): number => length(subtract(a, b));

/** Angle conversions: inputs and results speak degrees, Math speaks radians. */
export const toRadians = (degrees: number): number => (degrees * Math.PI) / 180;
export const toDegrees = (radians: number): number => (radians * 180) / Math.PI;

/** Unit vector at `degrees` counter-clockwise from +x. */
export const direction = (degrees: number): Point =>
  point(Math.cos(toRadians(degrees)), Math.sin(toRadians(degrees)));

/** Perpendicular distance from p to the infinite line through a and b (a ≠ b). */
export function distanceToLine(p: Point, a: Point, b: Point): number {
  return Math.abs(cross(subtract(b, a), subtract(p, a))) / distance(a, b);
}

/** Shortest distance from p to the segment a–b. */
export function distanceToSegment(p: Point, a: Point, b: Point): number {
  return distanceToSegmentXY(p.x, p.y, a.x, a.y, b.x, b.y);
}

/**
 * distanceToSegment on plain coordinates: the sweeps call it hundreds of times per gate, and
 * this form builds no point objects. Same arithmetic, in the same order, as the vector form.
 * hypot (not a plain square root) keeps results bit-identical with Math.hypot.
 */
export function distanceToSegmentXY(
  px: number,
  py: number,
  ax: number,
  ay: number,
  bx: number,
  by: number,
): number {
  const abx = bx - ax;
  const aby = by - ay;
  const lengthSquared = abx * abx + aby * aby;
  if (lengthSquared === 0) return hypot(px - ax, py - ay);
  const t = Math.min(1, Math.max(0, ((px - ax) * abx + (py - ay) * aby) / lengthSquared));
  return hypot(px - (ax + abx * t), py - (ay + aby * t));
}

/** True when segments a1–a2 and b1–b2 cross or touch. */
export function segmentsIntersect(a1: Point, a2: Point, b1: Point, b2: Point): boolean {
  return segmentsIntersectXY(a1.x, a1.y, a2.x, a2.y, b1.x, b1.y, b2.x, b2.y);
}

/** segmentsIntersect on plain coordinates (see distanceToSegmentXY). */
export function segmentsIntersectXY(
  a1x: number,
  a1y: number,
  a2x: number,
  a2y: number,
  b1x: number,
  b1y: number,
  b2x: number,
  b2y: number,
): boolean {
  const d1 = (a2x - a1x) * (b1y - a1y) - (a2y - a1y) * (b1x - a1x);
  const d2 = (a2x - a1x) * (b2y - a1y) - (a2y - a1y) * (b2x - a1x);
  const d3 = (b2x - b1x) * (a1y - b1y) - (b2y - b1y) * (a1x - b1x);
  const d4 = (b2x - b1x) * (a2y - b1y) - (b2y - b1y) * (a2x - b1x);
  if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) return true;
  return (
    (d1 === 0 && distanceToSegmentXY(b1x, b1y, a1x, a1y, a2x, a2y) === 0) ||
    (d2 === 0 && distanceToSegmentXY(b2x, b2y, a1x, a1y, a2x, a2y) === 0) ||
    (d3 === 0 && distanceToSegmentXY(a1x, a1y, b1x, b1y, b2x, b2y) === 0) ||
    (d4 === 0 && distanceToSegmentXY(a2x, a2y, b1x, b1y, b2x, b2y) === 0)
  );
}

/** Shortest distance between segments a1–a2 and b1–b2 (0 when they cross). */
export function segmentDistance(a1: Point, a2: Point, b1: Point, b2: Point): number {
  return segmentDistanceXY(a1.x, a1.y, a2.x, a2.y, b1.x, b1.y, b2.x, b2.y);
}

/** segmentDistance on plain coordinates (see distanceToSegmentXY). */
export function segmentDistanceXY(
  a1x: number,
  a1y: number,
  a2x: number,
  a2y: number,
  b1x: number,
  b1y: number,
  b2x: number,
  b2y: number,
): number {
  if (segmentsIntersectXY(a1x, a1y, a2x, a2y, b1x, b1y, b2x, b2y)) return 0;
  return Math.min(
    distanceToSegmentXY(a1x, a1y, b1x, b1y, b2x, b2y),
    distanceToSegmentXY(a2x, a2y, b1x, b1y, b2x, b2y),
    distanceToSegmentXY(b1x, b1y, a1x, a1y, a2x, a2y),
    distanceToSegmentXY(b2x, b2y, a1x, a1y, a2x, a2y),
  );
}
