/**
 * Kinds of measured answer and the unit each is held in. Lengths, forces, masses and speeds
 * convert through `src/lib/units.ts`; the other kinds have one unit on site, so the entered and
 * canonical values are the same number.
 */
import { isUnitOf, measure, type MeasureKind, type UnitOfKind } from '@/lib/units';

export const MEASURED_ANSWER_TYPES = ['length', 'force', 'mass', 'speed', 'time', 'voltage', 'current', 'angle', 'count'] as const;
export type MeasuredAnswerType = (typeof MEASURED_ANSWER_TYPES)[number];

/** Unit the engine reads each kind in (what `m.<key>` holds). */
export const CANONICAL_UNIT_OF: Readonly<Record<MeasuredAnswerType, string>> = Object.freeze({
  length: 'mm',
  force: 'N',
  mass: 'kg',
  speed: 'm/s',
  time: 's',
  voltage: 'V',
  current: 'A',
  angle: 'deg',
  count: 'count',
});

const CONVERTED: ReadonlySet<string> = new Set<MeasureKind>(['length', 'force', 'mass', 'speed']);

/** Which kind a unit belongs to, or undefined for a unit nobody enters. */
export function kindOfUnit(unit: string): MeasuredAnswerType | undefined {
  for (const kind of MEASURED_ANSWER_TYPES) {
    if (CONVERTED.has(kind) ? isUnitOf(kind as MeasureKind, unit) : CANONICAL_UNIT_OF[kind] === unit) return kind;
  }
  return undefined;
}

/** The canonical value of an entered value, as `measure()` in units.ts rounds it. */
export function canonicalValue(kind: MeasuredAnswerType, value: number, unit: string): number {
  if (CONVERTED.has(kind)) return measure(kind as MeasureKind, value, unit as UnitOfKind[MeasureKind]).canonical;
  return value;
}

/** Relative tolerance when checking a client's own conversion: well below any site measurement. */
export const CANONICAL_TOLERANCE = 1e-6;
