/**
 * The gate resource: what stands at a site, with its dimensions and operator facts. Lengths
 * are stored in millimetres and mass in kilograms; a client may send either the stored unit
 * (`widthMm: 3660`) or what was measured (`width: { value: 12, unit: "ft" }`), and the entered
 * form is kept beside the stored number so reports can show what was measured.
 */
import { z } from 'zod';
import { isUnitOf, measure, type LengthUnit, type MassUnit } from '@/lib/units';
import {
  IdSchema,
  IsoDateSchema,
  optionalText,
  pagingShape,
  SearchTextSchema,
  sortSchema,
  text,
} from './common';

/** How the gate moves (the same list as the database check and the rules engine). */
export const GATE_KIND_VALUES = [
  'swing',
  'slide',
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
] as const;
export type GateKindValue = (typeof GATE_KIND_VALUES)[number];
export const GATE_LEAVES = ['single', 'double'] as const;
/** Swing gates: toward the operator's side (pull) or away from it (push). */
export const OPENING_DIRECTIONS = ['pull_to_open', 'push_to_open'] as const;
export const OPERATOR_MOUNTINGS = [
  'post',
  'pad',
  'wall',
  'column',
  'underground',
  'overhead',
  'other',
] as const;
export const OPERATOR_POWER = ['mains_ac', 'low_voltage_ac', 'low_voltage_dc', 'solar', 'other'] as const;

/** Plausible bounds, so a unit slip (metres typed as millimetres) is caught at entry. */
export const GATE_DIMENSION_BOUNDS = {
  widthMm: { min: 100, max: 60_000 },
  heightMm: { min: 100, max: 12_000 },
  weightKg: { min: 1, max: 50_000 },
} as const;

const enumOf = <const T extends readonly [string, ...string[]]>(values: T) =>
  z.enum(values, `must be one of: ${values.join(', ')}`);
const nullable = <S extends z.ZodType>(schema: S) => schema.nullable().optional();

const entered = <K extends 'length' | 'mass'>(kind: K) =>
  z.strictObject({
    value: z
      .number('must be a number')
      .positive('must be greater than 0')
      .refine(Number.isFinite, 'must be a finite number'),
    unit: z
      .string()
      .refine(
        (u) => isUnitOf(kind, u),
        kind === 'length' ? 'must be one of: mm, cm, m, in, ft' : 'must be one of: kg, lb',
      ),
  });

export const OperatorFactsSchema = z.strictObject({
  /** Listed to the applicable safety standard (UL 325 in North America). */
  listed: nullable(z.boolean('must be true or false')),
  /** The operator closes the gate by itself after a timer. */
  automaticClosing: nullable(z.boolean('must be true or false')),
  manufacturedOn: nullable(IsoDateSchema),
  mounting: nullable(enumOf(OPERATOR_MOUNTINGS)),
  power: nullable(enumOf(OPERATOR_POWER)),
  /** Make and model as written on the operator's label. */
  model: optionalText(200),
});
export type OperatorFacts = z.infer<typeof OperatorFactsSchema>;

const gateFields = {
  siteId: IdSchema,
  label: text(120),
  kind: enumOf(GATE_KIND_VALUES),
  leaves: enumOf(GATE_LEAVES),
  openingDirection: nullable(enumOf(OPENING_DIRECTIONS)),
  widthMm: nullable(z.number('must be a number').int('must be whole millimetres')),
  width: nullable(entered('length')),
  heightMm: nullable(z.number('must be a number').int('must be whole millimetres')),
  height: nullable(entered('length')),
  weightKg: nullable(z.number('must be a number').int('must be whole kilograms')),
  weight: nullable(entered('mass')),
  operator: OperatorFactsSchema.optional(),
  installedOn: nullable(IsoDateSchema),
  nextInspectionDue: nullable(IsoDateSchema),
};

/** A dimension as it will be stored: the canonical integer and what was entered. */
export interface EnteredValue {
  value: number;
  unit: string;
}
type Dimension = 'width' | 'height' | 'weight';
const dimensionColumns = { width: 'widthMm', height: 'heightMm', weight: 'weightKg' } as const;

/** The resolved dimensions of a body: undefined = not sent, null = cleared. */
export type ResolvedDimensions = Partial<Record<Dimension, { stored: number; entered: EnteredValue } | null>>;

/**
 * Turns `widthMm` / `width` (and height, weight) into one resolved value each, refusing both
 * forms at once and values outside plausible bounds, named by the field that was sent.
 */
function resolveDimensions(body: Record<string, unknown>, ctx: z.RefinementCtx): ResolvedDimensions {
  const resolved: ResolvedDimensions = {};
  for (const dimension of ['width', 'height', 'weight'] as const) {
    const column = dimensionColumns[dimension];
    const direct = body[column] as number | null | undefined;
    const measured = body[dimension] as EnteredValue | null | undefined;
    if (direct !== undefined && measured !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: [dimension],
        message: `send either ${column} or ${dimension}, not both`,
      });
      continue;
    }
    if (direct === undefined && measured === undefined) continue;
    if (direct === null || measured === null) {
      resolved[dimension] = null;
      continue;
    }
    const kind = dimension === 'weight' ? 'mass' : 'length';
    const canonicalUnit = kind === 'mass' ? 'kg' : 'mm';
    const enteredValue: EnteredValue = measured ?? { value: direct as number, unit: canonicalUnit };
    const stored = Math.round(
      kind === 'mass'
        ? measure('mass', enteredValue.value, enteredValue.unit as MassUnit).canonical
        : measure('length', enteredValue.value, enteredValue.unit as LengthUnit).canonical,
    );
    const bounds = GATE_DIMENSION_BOUNDS[column];
    if (stored < bounds.min || stored > bounds.max) {
      ctx.addIssue({
        code: 'custom',
        path: [measured ? dimension : column],
        message: `must be between ${bounds.min} and ${bounds.max} ${canonicalUnit}${measured ? ` (was ${stored} ${canonicalUnit})` : ''}`,
      });
      continue;
    }
    resolved[dimension] = { stored, entered: enteredValue };
  }
  return resolved;
}

function withDimensions<T extends Record<string, unknown>>(body: T, ctx: z.RefinementCtx) {
  const dimensions = resolveDimensions(body, ctx);
  const { widthMm: _w, width: _wi, heightMm: _h, height: _he, weightKg: _k, weight: _we, ...rest } = body;
  return { ...rest, dimensions };
}

export const GateCreateSchema = z.strictObject(gateFields).transform(withDimensions);
export type GateCreate = z.infer<typeof GateCreateSchema>;

export const GatePatchSchema = z
  .strictObject(gateFields)
  .partial()
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change')
  .transform(withDimensions);
export type GatePatch = z.infer<typeof GatePatchSchema>;

export const GateListQuerySchema = z.strictObject({
  q: SearchTextSchema.optional(),
  siteId: IdSchema.optional(),
  clientId: IdSchema.optional(),
  kind: enumOf(GATE_KIND_VALUES).optional(),
  /** Gates whose next inspection is due on or before this date. */
  dueBy: IsoDateSchema.optional(),
  sort: sortSchema(['label', 'nextInspectionDue', 'createdAt', 'updatedAt'], 'label'),
  ...pagingShape,
});
export type GateListQuery = z.infer<typeof GateListQuerySchema>;

export interface Gate {
  id: string;
  siteId: string;
  clientId: string;
  label: string;
  kind: GateKindValue;
  leaves: (typeof GATE_LEAVES)[number];
  openingDirection: (typeof OPENING_DIRECTIONS)[number] | null;
  widthMm: number | null;
  heightMm: number | null;
  weightKg: number | null;
  /** What was measured, as entered, for each dimension that is set. */
  entered: Partial<Record<Dimension, EnteredValue>>;
  operator: OperatorFacts;
  installedOn: string | null;
  nextInspectionDue: string | null;
  createdAt: string;
  updatedAt: string;
}

/** Copying a gate's profile to a new gate on its site: the new gate's name (default: "<label> (copy)"). */
export const GateDuplicateSchema = z.strictObject({
  label: z.string().trim().min(1, 'must not be empty').max(120, 'must be at most 120 characters').optional(),
});
