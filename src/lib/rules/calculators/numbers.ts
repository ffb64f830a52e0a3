/**
 * Rounding and input checks shared by the calculators.
 *
 * The engine hashes every result, so numbers are rounded to a fixed precision (0.1 mm,
 * 0.1 N, 0.001 s) and never come out as NaN, -0 or undefined.
 */

/** Rounds to `decimals` places; tames float noise first (1.005 → 1.01) and turns -0 into 0. */
export function roundTo(value: number, decimals: number): number {
  const scale = 10 ** decimals;
  const scaled = value * scale;
  // Only a value within float noise of a half can round differently once tamed; everything
  // else skips the (dear) decimal round trip and gives the same result.
  const fraction = scaled - Math.floor(scaled);
  if (Math.abs(fraction - 0.5) > Math.abs(scaled) * 1e-13 + 1e-9) return Math.round(scaled) / scale + 0;
  return Math.round(Number(scaled.toPrecision(15))) / scale + 0;
}

/** Lengths in results: 0.1 mm. */
export const roundMm = (mm: number): number => roundTo(mm, 1);
/** Forces in results: 0.1 N. */
export const roundN = (newtons: number): number => roundTo(newtons, 1);
/** Times in results: 0.001 s. */
export const roundS = (seconds: number): number => roundTo(seconds, 3);
/** Angles in results: 0.1°. */
export const roundDeg = (degrees: number): number => roundTo(degrees, 1);

/** Rejects NaN and ±Infinity up front, so a bad entry fails loudly instead of poisoning a result. */
export function requireFinite(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new RangeError(`${name} must be a finite number`);
  return value;
}

/** Gaps, distances and counts cannot be negative. */
export function requireNonNegative(name: string, value: number): number {
  if (requireFinite(name, value) < 0) throw new RangeError(`${name} must not be negative`);
  return value;
}

/** Lengths such as a stroke or a bracket distance must be strictly positive. */
export function requirePositive(name: string, value: number): number {
  if (requireFinite(name, value) <= 0) throw new RangeError(`${name} must be greater than zero`);
  return value;
}

/** A measurement the technician may not have taken yet: null/undefined stay null (not measured). */
export function optionalNonNegative(name: string, value: number | null | undefined): number | null {
  return value === null || value === undefined ? null : requireNonNegative(name, value);
}

/** Yes/no answers that may still be open: undefined becomes null. */
export function optionalBoolean(value: boolean | null | undefined): boolean | null {
  return value === undefined ? null : value;
}
