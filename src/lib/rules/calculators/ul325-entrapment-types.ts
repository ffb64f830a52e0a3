/**
 * UL 325 entrapment-protection types as data: which types each gate kind and usage class may
 * use, before and after the 2016 revision. Kept apart from the judging logic so a ruleset can
 * pass its own table.
 */
import type { GateKind, UsageClass } from './gate-kind';

/**
 * A inherent sensing in the operator; B1 non-contact sensor (photo-eye); B2 contact sensor
 * (edge); C inherent clutch or pressure relief; D constant-pressure control; E audio alarm.
 * (UL 325; secondary source)
 */
export type EntrapmentDeviceType = 'A' | 'B1' | 'B2' | 'C' | 'D' | 'E';

/** Canonical order, used to keep every list in a result sorted the same way. */
export const ENTRAPMENT_DEVICE_TYPES: readonly EntrapmentDeviceType[] = Object.freeze([
  'A',
  'B1',
  'B2',
  'C',
  'D',
  'E',
]);

/** The two columns of the UL 325 table. */
export type Ul325KindGroup = 'slide_lift_pivot' | 'swing_barrier';

/**
 * Which table column a gate kind falls under. The table names slide, vertical lift and
 * vertical pivot gates in one column and swing gates and barrier arms in the other; an
 * overhead pivot gate is named in neither, so it maps to null (judged as "not in table").
 */
export const UL325_KIND_GROUP: Readonly<Record<GateKind, Ul325KindGroup | null>> = Object.freeze({
  slide: 'slide_lift_pivot',
  vertical_lift: 'slide_lift_pivot',
  vertical_pivot: 'slide_lift_pivot',
  swing: 'swing_barrier',
  barrier_arm: 'swing_barrier',
  overhead_pivot: null,
});

/** One cell pair of the table: types allowed as primary and as secondary protection. */
export interface PrimarySecondaryTypes {
  primary: readonly EntrapmentDeviceType[];
  secondary: readonly EntrapmentDeviceType[];
}

/** The whole pre-2016 table, so a ruleset can pass its own edition's version. */
export type Pre2016EntrapmentTable = Readonly<
  Record<Ul325KindGroup, Readonly<Record<UsageClass, PrimarySecondaryTypes>>>
>;

const row = (
  primary: readonly EntrapmentDeviceType[],
  secondary: readonly EntrapmentDeviceType[],
): PrimarySecondaryTypes =>
  Object.freeze({ primary: Object.freeze(primary), secondary: Object.freeze(secondary) });
const SLIDE_CLASS_1_2 = row(['A'], ['B1', 'B2', 'D']);
const SWING_CLASS_1_2 = row(['A', 'C'], ['A', 'B1', 'B2', 'C', 'D']);

/**
 * UL 325 Table 30A.1, editions before 2016: types allowed as primary and as secondary
 * protection by gate kind and usage class. The same type may not serve as both.
 * Secondary source, editions differ — verify against the edition the operator was listed to.
 */
export const UL325_PRE2016_ENTRAPMENT_TABLE: Pre2016EntrapmentTable = Object.freeze({
  slide_lift_pivot: Object.freeze({
    1: SLIDE_CLASS_1_2,
    2: SLIDE_CLASS_1_2,
    3: row(['A', 'B1', 'B2'], ['A', 'B1', 'B2', 'D', 'E']),
    4: row(['A', 'B1', 'B2', 'D'], ['A', 'B1', 'B2', 'D', 'E']),
  }),
  swing_barrier: Object.freeze({
    1: SWING_CLASS_1_2,
    2: SWING_CLASS_1_2,
    3: row(['A', 'B1', 'B2', 'C'], ['A', 'B1', 'B2', 'C', 'D']),
    4: row(['A', 'B1', 'B2', 'C', 'D'], ['A', 'B1', 'B2', 'C', 'D', 'E']),
  }),
});

/**
 * Types that may count as one of the two means from 2016 on, by column: the earlier table's
 * types for that column without E (which no longer counts). So C (clutch) stays limited to
 * swing gates and barrier arms. From memory of the 2016 table, verify.
 */
export const UL325_2016_ALLOWED_TYPES: Readonly<Record<Ul325KindGroup, readonly EntrapmentDeviceType[]>> =
  Object.freeze({
    slide_lift_pivot: ['A', 'B1', 'B2', 'D'],
    swing_barrier: ['A', 'B1', 'B2', 'C', 'D'],
  });

/** External devices that must be monitored every cycle from 2016 on. (UL 325; DASMA TDS 353 as quoted; secondary source) */
export const UL325_EXTERNAL_DEVICE_TYPES: readonly EntrapmentDeviceType[] = Object.freeze(['B1', 'B2']);

/** From 2016: at least two independent means (different types) per direction with an entrapment zone. Secondary source. */
export const UL325_2016_MIN_INDEPENDENT_TYPES = 2;

/** Operators made from this date fall under the 2016 rules. (UL 325 7th edition revision; secondary source) */
export const UL325_2016_EFFECTIVE_DATE = '2016-01-12';
