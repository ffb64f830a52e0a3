/**
 * Kinds of measured answer and the unit each is held in. Lengths, forces, masses and speeds
 * convert through `src/lib/units.ts`; the other kinds have one unit on site, so the entered and
 * canonical values are the same number.
 */
import {
  isUnitOf,
  measure,
  toKilograms,
  toMetresPerSecond,
  toMillimetres,
  toNewtons,
  type MeasureKind,
  type UnitOfKind,
} from '@/lib/units';

export const MEASURED_ANSWER_TYPES = [
  'length',
  'force',
  'mass',
  'speed',
  'time',
  'voltage',
  'current',
  'angle',
  'count',
] as const;
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

function lookUpKind(unit: string): MeasuredAnswerType | undefined {
  for (const kind of MEASURED_ANSWER_TYPES) {
    if (CONVERTED.has(kind) ? isUnitOf(kind as MeasureKind, unit) : CANONICAL_UNIT_OF[kind] === unit)
      return kind;
  }
  return undefined;
}

/** Units already looked up (every measurement of every input asks this). */
const kindByUnit = new Map<string, MeasuredAnswerType | undefined>();
const KIND_CACHE_LIMIT = 256;

/** Which kind a unit belongs to, or undefined for a unit nobody enters. */
export function kindOfUnit(unit: string): MeasuredAnswerType | undefined {
  if (kindByUnit.has(unit)) return kindByUnit.get(unit);
  const kind = lookUpKind(unit);
  if (kindByUnit.size < KIND_CACHE_LIMIT) kindByUnit.set(unit, kind);
  return kind;
}

/** The canonical value of an entered value, as `measure()` in units.ts rounds it. */
export function canonicalValue(kind: MeasuredAnswerType, value: number, unit: string): number {
  if (CONVERTED.has(kind))
    return measure(kind as MeasureKind, value, unit as UnitOfKind[MeasureKind]).canonical;
  return value;
}

/**
 * The canonical value without measure()'s rounding to 6 decimals: what input validation compares
 * a client's conversion with (cheaper, and the rounding is far inside the tolerance below).
 */
export function exactCanonicalValue(kind: MeasuredAnswerType, value: number, unit: string): number {
  switch (kind) {
    case 'length':
      return toMillimetres(value, unit as UnitOfKind['length']);
    case 'force':
      return toNewtons(value, unit as UnitOfKind['force']);
    case 'mass':
      return toKilograms(value, unit as UnitOfKind['mass']);
    case 'speed':
      return toMetresPerSecond(value, unit as UnitOfKind['speed']);
    default:
      return value;
  }
}

/** Relative tolerance when checking a client's own conversion: well below any site measurement. */
export const CANONICAL_TOLERANCE = 1e-6;
