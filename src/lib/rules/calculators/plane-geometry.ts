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
/** Vector length and the distance between two points. */
export const length = (a: Point): number => Math.hypot(a.x, a.y);
export const distance = (a: Point, b: Point): number => length(subtract(a, b));

/** Angle conversions: inputs and results speak degrees, Math speaks radians. */
export const toRadians = (degrees: number): number => (degrees * Math.PI) / 180;
export const toDegrees = (radians: number): number => (radians * 180) / Math.PI;

/** Unit vector at `degrees` counter-clockwise from +x. */
export const direction = (degrees: number): Point => point(Math.cos(toRadians(degrees)), Math.sin(toRadians(degrees)));

/** Perpendicular distance from p to the infinite line through a and b (a ≠ b). */
export function distanceToLine(p: Point, a: Point, b: Point): number {
  return Math.abs(cross(subtract(b, a), subtract(p, a))) / distance(a, b);
}

/** Shortest distance from p to the segment a–b. */
export function distanceToSegment(p: Point, a: Point, b: Point): number {
  const ab = subtract(b, a);
  const lengthSquared = dot(ab, ab);
  if (lengthSquared === 0) return distance(p, a);
  const t = Math.min(1, Math.max(0, dot(subtract(p, a), ab) / lengthSquared));
  return distance(p, add(a, scale(ab, t)));
}

/** True when segments a1–a2 and b1–b2 cross or touch. */
export function segmentsIntersect(a1: Point, a2: Point, b1: Point, b2: Point): boolean {
  const d1 = cross(subtract(a2, a1), subtract(b1, a1));
  const d2 = cross(subtract(a2, a1), subtract(b2, a1));
  const d3 = cross(subtract(b2, b1), subtract(a1, b1));
  const d4 = cross(subtract(b2, b1), subtract(a2, b1));
  if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) return true;
  return (
    (d1 === 0 && distanceToSegment(b1, a1, a2) === 0) ||
    (d2 === 0 && distanceToSegment(b2, a1, a2) === 0) ||
    (d3 === 0 && distanceToSegment(a1, b1, b2) === 0) ||
    (d4 === 0 && distanceToSegment(a2, b1, b2) === 0)
  );
}

/** Shortest distance between segments a1–a2 and b1–b2 (0 when they cross). */
export function segmentDistance(a1: Point, a2: Point, b1: Point, b2: Point): number {
  if (segmentsIntersect(a1, a2, b1, b2)) return 0;
  return Math.min(
    distanceToSegment(a1, b1, b2),
    distanceToSegment(a2, b1, b2),
    distanceToSegment(b1, a1, a2),
    distanceToSegment(b2, a1, a2),
  );
}
