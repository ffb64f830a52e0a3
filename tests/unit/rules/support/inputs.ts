/**
 * Builders for test inputs: measured values in the unit an auditor would enter them, answers,
 * and a deep-merge that lays a rule's pass/fail patch over a base gate.
 */
import { measure, type ForceUnit, type LengthUnit, type MassUnit, type SpeedUnit } from '@/lib/units';
import type { AssessmentInput } from '@/lib/rules';

export const len = (value: number, unit: LengthUnit = 'mm') => measure('length', value, unit);
export const force = (value: number, unit: ForceUnit = 'N') => measure('force', value, unit);
export const mass = (value: number, unit: MassUnit = 'kg') => measure('mass', value, unit);
export const speed = (value: number, unit: SpeedUnit = 'm/s') => measure('speed', value, unit);
export const count = (value: number) => ({ value, unit: 'count', canonical: value });
export const seconds = (value: number) => ({ value, unit: 's', canonical: value });
export const volts = (value: number) => ({ value, unit: 'V', canonical: value });
export const amps = (value: number) => ({ value, unit: 'A', canonical: value });

export const YES = { value: 'yes' as const };
export const NO = { value: 'no' as const };
export const NA = { value: 'na' as const };
export const choice = (value: string) => ({ value });

/** Marks a key for deletion in a patch (e.g. to leave a measurement out). */
export const REMOVE = Symbol('remove');

export type Patch = { [key: string]: unknown };

/** Deep-merges `patch` over `base`: objects merge, arrays and values replace, REMOVE deletes. */
export function applyPatch<T>(base: T, patch: Patch): T {
  const out: Record<string, unknown> = structuredClone(base) as Record<string, unknown>;
  for (const [key, value] of Object.entries(patch)) {
    if (value === REMOVE) {
      delete out[key];
      continue;
    }
    const current = out[key];
    const bothObjects =
      typeof value === 'object' &&
      value !== null &&
      !Array.isArray(value) &&
      typeof current === 'object' &&
      current !== null &&
      !Array.isArray(current);
    out[key] = bothObjects ? applyPatch(current, value as Patch) : structuredClone(value);
  }
  return out as T;
}

export type Input = AssessmentInput;
