/**
 * Hazard Rating Number: HRN = LO × FE × DPH × NP. Lets a report rank hazards the same way
 * every time. Published versions of the factor tables differ, so the table is data passed in;
 * the default is one widely reprinted version.
 */
import { requireNonNegative, roundTo } from './numbers';

// The site-based defaults live in their own file; callers import them from here.
export {
  deriveHrnFactors,
  HRN_DEFAULT_FE_BY_CLASS,
  HRN_DEFAULT_LO_BASE,
  HRN_DEFAULT_NP_BY_CLASS,
  HRN_DEFAULT_NP_PUBLIC_ACCESS,
  type DerivedHrnFactors,
  type HrnSiteFacts,
} from './hrn-defaults';

/** Likelihood of occurrence keys of the default table. */
export type LoKey =
  | 'almost_impossible'
  | 'highly_unlikely'
  | 'unlikely'
  | 'possible'
  | 'even_chance'
  | 'probable'
  | 'likely'
  | 'certain';
/** Frequency of exposure keys of the default table. */
export type FeKey = 'annually' | 'monthly' | 'weekly' | 'daily' | 'hourly' | 'constantly';
/** Degree of possible harm keys of the default table. */
export type DphKey =
  | 'scratch_bruise'
  | 'laceration'
  | 'minor_fracture'
  | 'major_fracture'
  | 'loss_of_one_limb_or_eye'
  | 'loss_of_two_limbs_or_eyes'
  | 'fatality';
/** Number-of-people band keys of the default table. */
export type NpKey = '1_2' | '3_7' | '8_15' | '16_50' | 'over_50';

/** A factor table; keys are ordered from least to most severe (object insertion order). */
export interface HrnTable {
  lo: Readonly<Record<string, number>>;
  fe: Readonly<Record<string, number>>;
  dph: Readonly<Record<string, number>>;
  /** People bands: `upTo` inclusive (null = no upper bound), smallest first. */
  np: ReadonlyArray<{ key: string; upTo: number | null; factor: number }>;
}

/**
 * One widely reprinted version of the HRN tables (as collected in our reference notes; other
 * versions differ, e.g. DPH 0.1, 0.5, 1, 2, 4, 8, 15). Secondary source, verify.
 */
export const HRN_TABLE_WIDELY_REPRINTED = Object.freeze({
  lo: Object.freeze({
    almost_impossible: 0.033,
    highly_unlikely: 1,
    unlikely: 1.5,
    possible: 2,
    even_chance: 5,
    probable: 8,
    likely: 10,
    certain: 15,
  }),
  fe: Object.freeze({ annually: 0.5, monthly: 1, weekly: 1.5, daily: 2.5, hourly: 4, constantly: 5 }),
  dph: Object.freeze({
    scratch_bruise: 0.1,
    laceration: 0.5,
    minor_fracture: 2,
    major_fracture: 4,
    loss_of_one_limb_or_eye: 6,
    loss_of_two_limbs_or_eyes: 10,
    fatality: 15,
  }),
  np: Object.freeze([
    { key: '1_2', upTo: 2, factor: 1 },
    { key: '3_7', upTo: 7, factor: 2 },
    { key: '8_15', upTo: 15, factor: 4 },
    { key: '16_50', upTo: 50, factor: 8 },
    { key: 'over_50', upTo: null, factor: 12 },
  ]),
} satisfies HrnTable);

/** Named risk bands, used for sorting and wording findings. */
export type HrnBand =
  'negligible' | 'very_low' | 'low' | 'significant' | 'high' | 'very_high' | 'extreme' | 'unacceptable';

/**
 * HRN bands (same source as the table). Convention: each band includes its upper bound, so
 * 1 is negligible, 5 very low, 1000 extreme and only values over 1000 unacceptable — matching
 * the wording "over 1000 unacceptable" and applied the same way at every boundary.
 */
export const HRN_BANDS: ReadonlyArray<{ band: HrnBand; upTo: number | null }> = Object.freeze([
  { band: 'negligible', upTo: 1 },
  { band: 'very_low', upTo: 5 },
  { band: 'low', upTo: 10 },
  { band: 'significant', upTo: 50 },
  { band: 'high', upTo: 100 },
  { band: 'very_high', upTo: 500 },
  { band: 'extreme', upTo: 1000 },
  { band: 'unacceptable', upTo: null },
]);

/**
 * Which band a value exactly on an edge falls in: `upper_inclusive` (a band holds its upper
 * bound: 50 is significant) or `lower_inclusive` (a band starts at the previous bound: 50 is high).
 */
export type HrnBandEdges = 'upper_inclusive' | 'lower_inclusive';

/** The band a hazard rating falls in (upper bounds inclusive unless `edges` says otherwise). */
export function hrnBand(
  value: number,
  bands: typeof HRN_BANDS = HRN_BANDS,
  edges: HrnBandEdges = 'upper_inclusive',
): HrnBand {
  requireNonNegative('HRN', value);
  const found = bands.find(
    (entry) =>
      entry.upTo === null || (edges === 'upper_inclusive' ? value <= entry.upTo : value < entry.upTo),
  );
  if (!found) throw new RangeError(`No band holds ${value}; the last band needs upTo: null`);
  return found.band;
}

function npRow(peopleCount: number, table: HrnTable) {
  requireNonNegative('peopleCount', peopleCount);
  if (!Number.isInteger(peopleCount)) throw new RangeError('peopleCount must be a whole number');
  const row = table.np.find((entry) => entry.upTo === null || peopleCount <= entry.upTo);
  if (!row) throw new RangeError(`No NP band holds ${peopleCount} people`);
  return row;
}

/** NP factor for the number of people exposed (0 is treated like the first band: someone will be there). */
export function npBand(peopleCount: number, table: HrnTable = HRN_TABLE_WIDELY_REPRINTED): number {
  return npRow(peopleCount, table).factor;
}

/** NP key for the number of people exposed, to store alongside the other factor keys. */
export function npKey(peopleCount: number, table: HrnTable = HRN_TABLE_WIDELY_REPRINTED): string {
  return npRow(peopleCount, table).key;
}

/** The four factor keys chosen for one hazard. */
export interface HrnFactorKeys {
  lo: string;
  fe: string;
  dph: string;
  np: string;
}

/** One hazard's rating with the factors behind it, for the report. */
export interface HrnResult {
  keys: HrnFactorKeys;
  factors: { lo: number; fe: number; dph: number; np: number };
  hrn: number;
  band: HrnBand;
}

function factorOf(table: Readonly<Record<string, number>>, key: string, name: string): number {
  const value = Object.prototype.hasOwnProperty.call(table, key) ? table[key] : undefined;
  if (value === undefined) throw new RangeError(`Unknown ${name} key "${key}"`);
  return value;
}

/** Rates one hazard from its factor keys. HRN is rounded to 6 decimals (0.033 × 0.5 × 0.1 × 1 = 0.00165 stays exact). */
export function calculateHrn(
  keys: HrnFactorKeys,
  table: HrnTable = HRN_TABLE_WIDELY_REPRINTED,
  bands: typeof HRN_BANDS = HRN_BANDS,
  edges: HrnBandEdges = 'upper_inclusive',
): HrnResult {
  const npEntry = table.np.find((entry) => entry.key === keys.np);
  if (!npEntry) throw new RangeError(`Unknown NP key "${keys.np}"`);
  const factors = {
    lo: factorOf(table.lo, keys.lo, 'LO'),
    fe: factorOf(table.fe, keys.fe, 'FE'),
    dph: factorOf(table.dph, keys.dph, 'DPH'),
    np: npEntry.factor,
  };
  const hrn = roundTo(factors.lo * factors.fe * factors.dph * factors.np, 6);
  return {
    keys: { lo: keys.lo, fe: keys.fe, dph: keys.dph, np: keys.np },
    factors,
    hrn,
    band: hrnBand(hrn, bands, edges),
  };
}
