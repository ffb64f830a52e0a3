/**
 * What an auditor brings back from a gate, as the engine reads it: the gate profile, the site,
 * answers (one map of every answer that is not measured), measurements (each with the unit it
 * was entered in and its canonical value),
 * entrapment zones and devices, force tests, swing-operator geometry and HRN overrides.
 * The API and the walk-through forms parse with these same schemas, so a value the engine
 * would refuse is refused at the form, with the field named.
 */
import { z } from 'zod';
import { dictionaryRecord } from './dictionary-record';
import { ENTRAPMENT_DEVICE_TYPES } from './calculators/ul325-entrapment-types';
import { CANONICAL_TOLERANCE, exactCanonicalValue, kindOfUnit } from './measures';
import { GATE_KINDS, KEY_PATTERN, TRAVEL_DIRECTIONS } from './vocabulary';

/**
 * A strict object whose members are handed to zod in sorted key order, so a parsed value's keys
 * come out in canonical order (object keys sorted by code unit, as canonicalJson in hash.ts
 * writes them) and the engine can hash a parsed input with the native JSON.stringify. The
 * declaration order below stays the readable one.
 */
function canonicalObject<T extends z.core.$ZodLooseShape>(shape: T) {
  const sorted = Object.fromEntries(
    Object.keys(shape)
      .sort()
      .map((name) => [name, shape[name]]),
  ) as T;
  return z.strictObject(sorted);
}

/** A problem a cross-field check found: where, relative to the checked value, and what. */
interface Problem {
  path: PropertyKey[];
  message: string;
}

/**
 * Adds a cross-field check. zod's superRefine builds a fresh issue-reporting closure on every parse;
 * on every measured value that was the dearest single cost of scoring (about 60 of 160 µs). Here
 * the check returns its problems (usually none, allocating nothing) and they become zod custom
 * issues, with the same paths and messages.
 */
function withCheck<T extends z.ZodType>(
  schema: T,
  findProblems: (value: z.output<T>) => Problem[] | undefined,
): T {
  const check: z.core.$ZodCheck<z.output<T>> = z.check<z.output<T>>((payload) => {
    const problems = findProblems(payload.value);
    if (problems)
      for (const { path, message } of problems)
        payload.issues.push({
          code: 'custom',
          input: payload.value,
          inst: check,
          continue: true,
          path,
          message,
        });
  });
  return schema.check(check) as T;
}

const note = z.string().trim().max(2000, 'a note may be at most 2000 characters');
const key = z
  .string()
  .regex(KEY_PATTERN, 'keys are camelCase letters and digits, starting with a lower-case letter');
const finite = z.number({ message: 'must be a number' }).finite('must be a finite number');
const nonNegativeMm = finite.nonnegative('must not be negative');

/**
 * A measured value: `value` in the `unit` the auditor entered, and `canonical` in the unit the
 * engine reads (mm, N, kg, m/s, s, V, A, deg, count). The canonical value must match the entered
 * one, so a form's conversion slip is caught here, not in a report.
 */
export const MeasuredValueSchema = withCheck(
  canonicalObject({
    value: finite,
    unit: z.string().min(1).max(8),
    canonical: finite,
    note: note.optional(),
  }),
  (m) => {
    const kind = kindOfUnit(m.unit);
    if (!kind) return [{ path: ['unit'], message: `unknown unit "${m.unit}"` }];
    const expected = exactCanonicalValue(kind, m.value, m.unit);
    if (Math.abs(expected - m.canonical) > CANONICAL_TOLERANCE * Math.max(1, Math.abs(expected))) {
      return [
        {
          path: ['canonical'],
          message: `${m.value} ${m.unit} is ${Math.round(expected * 1e6) / 1e6} in canonical units, not ${m.canonical}`,
        },
      ];
    }
    return undefined;
  },
);
export type MeasuredValue = z.infer<typeof MeasuredValueSchema>;

export const UsageClassSchema = z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4)], {
  message: 'usage class must be 1, 2, 3 or 4',
});

/** The profile's dimensions and the kind of unit each must be entered in. */
const PROFILE_DIMENSIONS: ReadonlyArray<
  readonly ['leafWidth' | 'leafHeight' | 'leafWeight', 'length' | 'mass']
> = [
  ['leafWidth', 'length'],
  ['leafHeight', 'length'],
  ['leafWeight', 'mass'],
];

/** The gate as recorded in the office: what it is, how it opens, who uses it. */
export const GateProfileSchema = withCheck(
  canonicalObject({
    kind: z.enum(GATE_KINDS),
    leaves: z.enum(['single', 'double']),
    /** Swing gates: pull_to_open opens toward the operator's side, push_to_open away from it. */
    openingDirection: z.enum(['pull_to_open', 'push_to_open']).optional(),
    usageClass: UsageClassSchema,
    leafWidth: MeasuredValueSchema.optional(),
    leafHeight: MeasuredValueSchema.optional(),
    leafWeight: MeasuredValueSchema.optional(),
    /** The operator is listed to the applicable safety standard (label seen or paperwork). */
    operatorListed: z.boolean(),
    automaticClosing: z.boolean(),
    operatorManufacturedOn: z.iso.date({ message: 'must be a date written YYYY-MM-DD' }).optional(),
  }),
  (p) => {
    let problems: Problem[] | undefined;
    if (p.kind === 'swing' && !p.openingDirection)
      (problems ??= []).push({
        path: ['openingDirection'],
        message: 'a swing gate needs its opening direction',
      });
    for (const [field, kind] of PROFILE_DIMENSIONS) {
      const m = p[field];
      if (!m) continue;
      if (kindOfUnit(m.unit) !== kind)
        (problems ??= []).push({ path: [field, 'unit'], message: `${field} must be entered as a ${kind}` });
      if (m.canonical <= 0)
        (problems ??= []).push({ path: [field, 'value'], message: `${field} must be greater than zero` });
    }
    return problems;
  },
);
export type GateProfile = z.infer<typeof GateProfileSchema>;

/** Who is around the gate: drives which rules apply and the HRN likelihood, frequency and people. */
export const SiteContextSchema = canonicalObject({
  pedestriansUseDriveway: z.boolean(),
  childrenOrPetsPresent: z.boolean(),
  publicAccess: z.boolean(),
  slopeAcrossSwing: z.boolean(),
});
export type SiteContext = z.infer<typeof SiteContextSchema>;

/**
 * An answer to a question that is not measured: yes / no / na, a choice, a date or short text.
 * Which it must be is the question's answer type in the version scored against, so the value is
 * checked there (checkInputAgainstRuleset), not here.
 */
export const AnswerSchema = canonicalObject({
  value: z.string().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters'),
  note: note.optional(),
});
export type Answer = z.infer<typeof AnswerSchema>;

/** Places along a gate where someone can be caught (UL 325 entrapment zones, as the auditor finds them). */
export const ENTRAPMENT_ZONES = [
  'closing_edge',
  'hinge_side',
  'open_side',
  'post_gap',
  'gate_bottom',
  'other',
] as const;

/** Entrapment zones found on the walk and the protection devices fitted, per zone and direction. */
export const EntrapmentInputSchema = canonicalObject({
  zones: z
    .array(
      canonicalObject({
        zone: z.enum(ENTRAPMENT_ZONES),
        direction: z.enum(TRAVEL_DIRECTIONS),
        note: note.optional(),
      }),
    )
    .max(20),
  devices: z
    .array(
      canonicalObject({
        type: z.enum(ENTRAPMENT_DEVICE_TYPES as unknown as ['A', 'B1', 'B2', 'C', 'D', 'E']),
        direction: z.enum(TRAVEL_DIRECTIONS),
        zone: z.enum(ENTRAPMENT_ZONES),
        /** The operator checks the device every cycle. */
        monitored: z.boolean(),
        note: note.optional(),
      }),
    )
    .max(30),
  /** Which UL 325 regime applies when the label date is unreadable but the listing is known. */
  edition: z.enum(['pre-2016', '2016']).optional(),
});
export type EntrapmentInput = z.infer<typeof EntrapmentInputSchema>;

/** A force meter's own summary of one measuring point, when the raw trace is not kept. */
export const ForceSummarySchema = canonicalObject({
  peakN: nonNegativeMm,
  durationAbove150S: nonNegativeMm,
  staticN: nonNegativeMm,
  residualAt5sN: nonNegativeMm,
});

/** One force measurement at one point: raw samples (time s, force N) or the meter's summary. */
export const ForceTestSchema = withCheck(
  canonicalObject({
    location: z.enum(['closing_edge', 'opening_edge', 'hinge_side', 'post_gap', 'other']),
    direction: z.enum(TRAVEL_DIRECTIONS),
    /** Gap left at the measuring point, mm (EN 12445 points at 50, 300 and 500 mm). */
    gapMm: nonNegativeMm,
    heightMm: nonNegativeMm.optional(),
    samples: z
      .array(canonicalObject({ t: finite, f: finite }))
      .min(2)
      .max(20_000)
      .optional(),
    summary: ForceSummarySchema.optional(),
    note: note.optional(),
  }),
  (t) =>
    !t.samples === !t.summary
      ? [{ path: ['samples'], message: 'give either the samples or the summary of the trace, not both' }]
      : undefined,
);
export type ForceTest = z.infer<typeof ForceTestSchema>;

/**
 * Top view of a linear swing operator (mm, degrees): A back along the gate line from the hinge
 * axis to the rear pivot, B across it (negative: operator on the far side), the leaf bracket's
 * distance from the hinge, the ram's retracted length and stroke, the opening wanted.
 */
export const SwingGeometryInputSchema = withCheck(
  canonicalObject({
    aMm: finite,
    bMm: finite,
    bracketFromHingeMm: finite.positive('must be greater than zero'),
    retractedLengthMm: finite.positive('must be greater than zero'),
    strokeMm: finite.positive('must be greater than zero'),
    targetOpeningDeg: finite.gt(0, 'must be above 0°').lte(180, 'must be at most 180°'),
    bracketOffsetMm: nonNegativeMm.optional(),
    leafThicknessMm: nonNegativeMm.optional(),
    operatorHalfWidthMm: nonNegativeMm.optional(),
    operatorBodyLengthMm: finite.positive().optional(),
  }),
  (g) =>
    g.aMm === 0 && g.bMm === 0
      ? [{ path: ['bMm'], message: 'the rear pivot cannot sit on the hinge axis' }]
      : undefined,
);
export type SwingGeometryInput = z.infer<typeof SwingGeometryInputSchema>;

const hrnKey = z.string().regex(/^[a-z0-9_]{1,40}$/);
/** The auditor's own HRN factor keys for one rule, when the derived defaults do not fit the site. */
export const HrnOverrideSchema = canonicalObject({
  lo: hrnKey.optional(),
  fe: hrnKey.optional(),
  dph: hrnKey.optional(),
  np: hrnKey.optional(),
  reason: z.string().trim().min(1, 'say why the rating was changed').max(500),
});

/**
 * The whole assessment input scored against a ruleset version. `answers` holds every answer that
 * is not a measurement (yes / no / na, choices, dates, text), keyed by question, as the draft
 * stores them.
 */
export const AssessmentInputSchema = canonicalObject({
  profile: GateProfileSchema,
  site: SiteContextSchema,
  // Records keyed by question parse into dictionaries (null-prototype objects): see dictionary-record.ts.
  answers: dictionaryRecord(key, AnswerSchema).optional(),
  measurements: dictionaryRecord(key, MeasuredValueSchema).optional(),
  entrapment: EntrapmentInputSchema.optional(),
  forceTests: z.array(ForceTestSchema).max(50).optional(),
  swingGeometry: SwingGeometryInputSchema.optional(),
  hrnOverrides: dictionaryRecord(z.string().min(3).max(120), HrnOverrideSchema).optional(),
});
export type AssessmentInput = z.infer<typeof AssessmentInputSchema>;
