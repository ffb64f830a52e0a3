/**
 * Judges the entrapment-protection devices fitted to a gate operator, per direction of
 * travel, under both UL 325 regimes (the pre-2016 primary/secondary table and the 2016 rules
 * of two independent, monitored means), and says which regime applies to this operator.
 */
import { z } from 'zod';
import type { GateKind, UsageClass } from './gate-kind';
import {
  ENTRAPMENT_DEVICE_TYPES,
  UL325_2016_ALLOWED_TYPES,
  UL325_2016_EFFECTIVE_DATE,
  UL325_2016_MIN_INDEPENDENT_TYPES,
  UL325_EXTERNAL_DEVICE_TYPES,
  UL325_KIND_GROUP,
  UL325_PRE2016_ENTRAPMENT_TABLE,
  type EntrapmentDeviceType,
  type Pre2016EntrapmentTable,
  type Ul325KindGroup,
} from './ul325-entrapment-types';

/** The two UL 325 regimes for entrapment protection. */
export type EntrapmentEdition = 'pre-2016' | '2016';
/** Entrapment protection is judged per direction of travel. */
export type TravelDirection = 'opening' | 'closing';

/** One entrapment-protection device (or inherent feature) found on the gate. */
export interface FittedDevice {
  type: EntrapmentDeviceType;
  /** The operator checks the device every cycle (matters for external B1/B2 devices from 2016). */
  monitored: boolean;
}

/** What the auditor records about the operator and its protection devices. */
export interface EntrapmentProtectionInput {
  gateKind: GateKind;
  usageClass: UsageClass;
  automaticClosing: boolean;
  /** Date of manufacture of the operator (ISO 8601); picks the edition unless `edition` is given. */
  manufacturedOn?: string | null;
  /** Rule edition chosen explicitly (e.g. the label is unreadable but the listing is known). */
  edition?: EntrapmentEdition | null;
  devices: Record<TravelDirection, readonly FittedDevice[]>;
  /** Directions of travel in which an entrapment zone exists. */
  entrapmentZones: Record<TravelDirection, boolean>;
}

/** Machine codes, in the order they appear in `reasons`. */
export const ENTRAPMENT_REASONS = [
  'kind_not_in_table',
  'no_devices',
  'primary_not_allowed',
  'needs_secondary',
  'same_type_both_roles',
  'needs_two_types',
  'same_type_twice',
  'unmonitored_external',
  'type_e_not_counted',
  'd_with_auto_close',
  'type_not_allowed_for_kind',
] as const;
/** Machine code of one finding about a direction's protection. */
export type EntrapmentReason = (typeof ENTRAPMENT_REASONS)[number];

/** Judgement of one direction of travel under one edition. */
export interface DirectionJudgement {
  entrapmentZone: boolean;
  /** Requirement met with the counted types; true when no entrapment zone; null when the table has no entry. */
  compliant: boolean | null;
  /** Every finding: unmet requirements and fitted devices that do not count (a compliant direction may carry some). */
  reasons: EntrapmentReason[];
  /** Distinct fitted types that count under this edition. */
  countedTypes: EntrapmentDeviceType[];
  /** Pre-2016 only: the primary/secondary pair found, else null. */
  assignment: { primary: EntrapmentDeviceType; secondary: EntrapmentDeviceType } | null;
}

/** Both directions under one edition. */
export interface EditionJudgement {
  opening: DirectionJudgement;
  closing: DirectionJudgement;
  compliant: boolean | null;
}

/** Judgement under both editions and the verdict under the one that applies. */
export interface EntrapmentProtectionResult {
  /** From `edition`, else from `manufacturedOn`; null when neither is known. */
  applicableEdition: EntrapmentEdition | null;
  byEdition: Record<EntrapmentEdition, EditionJudgement>;
  /** Verdict under the applicable edition; null when the edition is unknown. */
  compliant: boolean | null;
}

/** Tables and thresholds a ruleset may replace. */
export interface EntrapmentRules {
  pre2016Table: Pre2016EntrapmentTable;
  allowed2016: Readonly<Record<Ul325KindGroup, readonly EntrapmentDeviceType[]>>;
  externalTypes: readonly EntrapmentDeviceType[];
  minIndependentTypes2016: number;
  effectiveDate2016: string;
}

const DEFAULT_RULES: EntrapmentRules = {
  pre2016Table: UL325_PRE2016_ENTRAPMENT_TABLE,
  allowed2016: UL325_2016_ALLOWED_TYPES,
  externalTypes: UL325_EXTERNAL_DEVICE_TYPES,
  minIndependentTypes2016: UL325_2016_MIN_INDEPENDENT_TYPES,
  effectiveDate2016: UL325_2016_EFFECTIVE_DATE,
};

const sortTypes = (types: Iterable<EntrapmentDeviceType>): EntrapmentDeviceType[] => {
  const present = types instanceof Set ? (types as ReadonlySet<EntrapmentDeviceType>) : new Set(types);
  return ENTRAPMENT_DEVICE_TYPES.filter((type) => present.has(type));
};

const sortReasons = (reasons: Set<EntrapmentReason>): EntrapmentReason[] =>
  ENTRAPMENT_REASONS.filter((reason) => reasons.has(reason));

/** YYYY-MM-DD, alone or followed by a time (`T…`): only the date part is judged. */
const ISO_DATE = /^\d{4}-\d{2}-\d{2}(?:$|T)/;

/** Picks the rule edition from an explicit choice or the operator's date of manufacture. */
export function applicableEntrapmentEdition(
  manufacturedOn: string | null | undefined,
  edition?: EntrapmentEdition | null,
  effectiveDate2016: string = UL325_2016_EFFECTIVE_DATE,
): EntrapmentEdition | null {
  if (edition) return edition;
  if (manufacturedOn === null || manufacturedOn === undefined) return null;
  return manufactureDateIsValid(manufacturedOn)
    ? manufacturedOn.slice(0, 10) >= effectiveDate2016
      ? '2016'
      : 'pre-2016'
    : refuseDate(manufacturedOn);
}

/** A real calendar date in YYYY-MM-DD form, leap years included: zod's ISO date check, as the input schema uses. */
const CalendarDate = z.iso.date();

/** Dates already judged (every assessment of a gate carries the same one; the zod check was a dear part of the facts). */
const judgedDates = new Map<string, boolean>();
const JUDGED_DATES_LIMIT = 4096;

function manufactureDateIsValid(manufacturedOn: string): boolean {
  let valid = judgedDates.get(manufacturedOn);
  if (valid === undefined) {
    valid = ISO_DATE.test(manufacturedOn) && CalendarDate.safeParse(manufacturedOn.slice(0, 10)).success;
    if (judgedDates.size < JUDGED_DATES_LIMIT) judgedDates.set(manufacturedOn, valid);
  }
  return valid;
}

function refuseDate(manufacturedOn: string): never {
  throw new RangeError(`manufacturedOn must be an ISO date (YYYY-MM-DD), got "${manufacturedOn}"`);
}

function judgePre2016(
  input: EntrapmentProtectionInput,
  direction: TravelDirection,
  rules: EntrapmentRules,
): DirectionJudgement {
  const entrapmentZone = input.entrapmentZones[direction];
  const reasons = new Set<EntrapmentReason>();
  const group = UL325_KIND_GROUP[input.gateKind];
  const row = group ? rules.pre2016Table[group][input.usageClass] : undefined;
  const fitted = input.devices[direction];
  if (!row) {
    reasons.add('kind_not_in_table');
    return {
      entrapmentZone,
      compliant: entrapmentZone ? null : true,
      reasons: sortReasons(reasons),
      countedTypes: [],
      assignment: null,
    };
  }
  const usable = new Set<EntrapmentDeviceType>();
  for (const device of fitted) {
    if (device.type === 'D' && input.automaticClosing) reasons.add('d_with_auto_close');
    else if (!row.primary.includes(device.type) && !row.secondary.includes(device.type))
      reasons.add('type_not_allowed_for_kind');
    else usable.add(device.type);
  }
  const countedTypes = sortTypes(usable);
  const primaries = row.primary.filter((type) => usable.has(type));
  const secondaries = row.secondary.filter((type) => usable.has(type));
  let assignment: DirectionJudgement['assignment'] = null;
  for (const primary of primaries) {
    const secondary = secondaries.find((type) => type !== primary);
    if (secondary) {
      assignment = { primary, secondary };
      break;
    }
  }
  if (entrapmentZone && !assignment) {
    if (fitted.length === 0) reasons.add('no_devices');
    else if (primaries.length === 0) reasons.add('primary_not_allowed');
    else if (secondaries.length === 0) reasons.add('needs_secondary');
    else reasons.add('same_type_both_roles');
  }
  return {
    entrapmentZone,
    compliant: !entrapmentZone || assignment !== null,
    reasons: sortReasons(reasons),
    countedTypes,
    assignment,
  };
}

function judge2016(
  input: EntrapmentProtectionInput,
  direction: TravelDirection,
  rules: EntrapmentRules,
): DirectionJudgement {
  const entrapmentZone = input.entrapmentZones[direction];
  const reasons = new Set<EntrapmentReason>();
  const group = UL325_KIND_GROUP[input.gateKind];
  const allowed = group ? rules.allowed2016[group] : null;
  const counted = new Set<EntrapmentDeviceType>();
  let countedDevices = 0;
  for (const device of input.devices[direction]) {
    if (device.type === 'E') reasons.add('type_e_not_counted');
    else if (device.type === 'D' && input.automaticClosing) reasons.add('d_with_auto_close');
    else if (allowed && !allowed.includes(device.type)) reasons.add('type_not_allowed_for_kind');
    else if (rules.externalTypes.includes(device.type) && !device.monitored)
      reasons.add('unmonitored_external');
    else {
      counted.add(device.type);
      countedDevices += 1;
    }
  }
  const enough = counted.size >= rules.minIndependentTypes2016;
  if (entrapmentZone && !enough) {
    reasons.add('needs_two_types');
    if (countedDevices > counted.size) reasons.add('same_type_twice');
  }
  return {
    entrapmentZone,
    compliant: !entrapmentZone || enough,
    reasons: sortReasons(reasons),
    countedTypes: sortTypes(counted),
    assignment: null,
  };
}

function combine(opening: DirectionJudgement, closing: DirectionJudgement): EditionJudgement {
  const both = [opening.compliant, closing.compliant];
  const compliant = both.includes(false) ? false : both.includes(null) ? null : true;
  return { opening, closing, compliant };
}

/**
 * Judges fitted entrapment protection per direction under both editions and gives the verdict
 * under the one that applies. A direction without an entrapment zone needs no protection.
 */
export function assessEntrapmentProtection(
  input: EntrapmentProtectionInput,
  rules: Partial<EntrapmentRules> = {},
): EntrapmentProtectionResult {
  const merged: EntrapmentRules = { ...DEFAULT_RULES, ...rules };
  const applicableEdition = applicableEntrapmentEdition(
    input.manufacturedOn,
    input.edition,
    merged.effectiveDate2016,
  );
  const byEdition: Record<EntrapmentEdition, EditionJudgement> = {
    'pre-2016': combine(judgePre2016(input, 'opening', merged), judgePre2016(input, 'closing', merged)),
    '2016': combine(judge2016(input, 'opening', merged), judge2016(input, 'closing', merged)),
  };
  return {
    applicableEdition,
    byEdition,
    compliant: applicableEdition === null ? null : byEdition[applicableEdition].compliant,
  };
}

/** What the entrapment facts read of one direction's judgement under both editions. */
export interface DirectionVerdict {
  /** As `judgePre2016(...).compliant`. */
  compliantPre2016: boolean | null;
  /** As `judge2016(...).compliant`. */
  compliant2016: boolean | null;
  /** As `judge2016(...).countedTypes.length`. */
  countedTypes2016: number;
}

/** A fitted device as the input records it, with its direction of travel. */
export interface DirectedDevice {
  readonly type: EntrapmentDeviceType;
  readonly direction: TravelDirection;
  readonly monitored: boolean;
}

/** Device types as bits, so the tables' lists become masks. */
const TYPE_BIT: Readonly<Record<string, number>> = Object.freeze(
  Object.fromEntries(ENTRAPMENT_DEVICE_TYPES.map((type, i) => [type, 1 << i])),
);
const maskOf = (types: readonly EntrapmentDeviceType[]): number =>
  types.reduce((mask, type) => mask | TYPE_BIT[type]!, 0);
const EXTERNAL_MASK = maskOf(DEFAULT_RULES.externalTypes);
const BIT_D = TYPE_BIT.D!;
const PRE2016_MASKS = Object.fromEntries(
  Object.entries(DEFAULT_RULES.pre2016Table).map(([group, byClass]) => [
    group,
    Object.fromEntries(
      Object.entries(byClass).map(([usageClass, row]) => [
        usageClass,
        { primary: maskOf(row.primary), secondary: maskOf(row.secondary) },
      ]),
    ),
  ]),
) as Record<Ul325KindGroup, Record<UsageClass, { primary: number; secondary: number } | undefined>>;
const ALLOWED_2016_MASK = Object.fromEntries(
  Object.entries(DEFAULT_RULES.allowed2016).map(([group, types]) => [group, maskOf(types)]),
) as Record<Ul325KindGroup, number>;
const BIT_E = TYPE_BIT.E!;

const bitCount = (mask: number): number => {
  let n = 0;
  for (let m = mask; m !== 0; m &= m - 1) n++;
  return n;
};

/**
 * The verdicts the entrapment facts read — per direction, compliance under each edition and how
 * many types count under 2016 — by the same rules as assessEntrapmentProtection with the default
 * tables, without building its full judgement (sets, reasons and lists per direction and edition,
 * which made it the dearest part of the facts). A unit test holds the two equal.
 */
export function entrapmentVerdicts(
  input: Omit<EntrapmentProtectionInput, 'devices'> & { devices: readonly DirectedDevice[] },
  direction: TravelDirection,
): DirectionVerdict {
  const rules = DEFAULT_RULES;
  const zone = input.entrapmentZones[direction];
  const group = UL325_KIND_GROUP[input.gateKind];
  const row = group ? PRE2016_MASKS[group][input.usageClass] : undefined;
  const primary = row ? row.primary : 0;
  const secondary = row ? row.secondary : 0;
  // No group: 2016 restricts no type (as judge2016 with no allowed list).
  const allowed = group ? ALLOWED_2016_MASK[group] : -1;
  let usable = 0;
  let counted = 0;
  const { devices, automaticClosing } = input;
  for (let i = 0; i < devices.length; i++) {
    const device = devices[i]!;
    if (device.direction !== direction) continue;
    const bit = TYPE_BIT[device.type] ?? 0;
    if (bit === BIT_D && automaticClosing) continue;
    // pre-2016: a type the table lists for this kind and class, as primary or secondary.
    if (bit & (primary | secondary)) usable |= bit;
    // 2016: type E never counts; an external device counts only when monitored.
    if (bit !== BIT_E && bit & allowed && !(bit & EXTERNAL_MASK && !device.monitored)) counted |= bit;
  }
  // A primary and a different secondary among the usable types.
  const primaries = usable & primary;
  const secondaries = usable & secondary;
  const assigned =
    primaries !== 0 && secondaries !== 0 && !(primaries === secondaries && bitCount(primaries) === 1);
  const countedTypes2016 = bitCount(counted);
  return {
    compliantPre2016: row ? !zone || assigned : zone ? null : true,
    compliant2016: !zone || countedTypes2016 >= rules.minIndependentTypes2016,
    countedTypes2016,
  };
}
