/**
 * The one way an engine input is made from what is stored about a visit: the gate profile (the
 * gate row with its site's usage class) and the draft's three documents (answers, measurements,
 * observations). The walk-through's live preview (on the device), the server at submit and the
 * ruleset impact list (re-scoring the archive) all call this, so they cannot read different facts.
 *
 * Pure and free of zod, so the walk-through's script stays small. It does not validate: the
 * documents were checked when they were saved (PATCH) and the gate when it was edited. It says
 * what must still be known before the gate can be scored (`missing`), in the API's field names.
 *
 * Answers are handed over as the one stored map: the engine knows each question's answer type
 * from the version it scores against. The stored entries are used as they are (not copied).
 */
import type { AssessmentInput, MeasuredValue } from './input';
import { canonicalValue, kindOfUnit } from './measures';

/** What the engine is told about the gate: the gate row as it stands, with its site's usage class. */
export interface GateForScoring {
  kind: AssessmentInput['profile']['kind'];
  leaves: AssessmentInput['profile']['leaves'];
  openingDirection?: AssessmentInput['profile']['openingDirection'] | null;
  widthMm: number | null;
  heightMm: number | null;
  weightKg: number | null;
  /** Each dimension as the auditor entered it (value and unit), when not in millimetres / kilograms. */
  entered: { width?: EnteredValue; height?: EnteredValue; weight?: EnteredValue };
  operator: { listed?: boolean | null; automaticClosing?: boolean | null; manufacturedOn?: string | null };
  usageClass: number;
}

interface EnteredValue {
  value: number;
  unit: string;
}

/** The stored documents of a visit, as the API keeps them. */
export interface StoredDocuments {
  answers: Readonly<Record<string, { value: string; note?: string }>>;
  measurements: Readonly<Record<string, MeasuredValue>>;
  observations: {
    site?: Partial<AssessmentInput['site']> | null;
    entrapment?: AssessmentInput['entrapment'] | null;
    forceTests?: AssessmentInput['forceTests'] | null;
    swingGeometry?: AssessmentInput['swingGeometry'] | null;
    hrnOverrides?: AssessmentInput['hrnOverrides'] | null;
  };
}

/** Something the engine needs that is not recorded yet, at the field where it is recorded. */
export interface MissingField {
  field: string;
  message: string;
}

export interface AssembledInput {
  input: AssessmentInput;
  /** Empty when the gate can be scored. */
  missing: MissingField[];
}

/** The site facts every assessment needs (they drive applicability and the HRN). */
export const SITE_FACT_KEYS = [
  'pedestriansUseDriveway',
  'childrenOrPetsPresent',
  'publicAccess',
  'slopeAcrossSwing',
] as const;

const REQUIRED = 'is required before submitting';

function dimension(
  stored: number | null | undefined,
  entered: EnteredValue | undefined,
  canonicalUnit: 'mm' | 'kg',
): MeasuredValue | undefined {
  if (stored === null || stored === undefined) return undefined;
  const { value, unit } = entered ?? { value: stored, unit: canonicalUnit };
  const kind = kindOfUnit(unit) ?? (canonicalUnit === 'mm' ? 'length' : 'mass');
  return { value, unit, canonical: canonicalValue(kind, value, unit) };
}

/** Builds the engine input from the gate and the stored documents, and says what is still missing. */
export function assembleInput(gate: GateForScoring, documents: StoredDocuments): AssembledInput {
  const missing: MissingField[] = [];
  const observations = documents.observations ?? {};
  const site = (observations.site ?? {}) as Partial<AssessmentInput['site']>;
  for (const key of SITE_FACT_KEYS)
    if (typeof site[key] !== 'boolean')
      missing.push({ field: `observations.site.${key}`, message: REQUIRED });
  const operator = gate.operator ?? {};
  if (typeof operator.listed !== 'boolean')
    missing.push({ field: 'gate.operator.listed', message: REQUIRED });
  if (typeof operator.automaticClosing !== 'boolean')
    missing.push({ field: 'gate.operator.automaticClosing', message: REQUIRED });
  if (gate.kind === 'swing' && !gate.openingDirection)
    missing.push({ field: 'gate.openingDirection', message: 'a swing gate needs its opening direction' });
  if (gate.usageClass !== 1 && gate.usageClass !== 2 && gate.usageClass !== 3 && gate.usageClass !== 4)
    missing.push({ field: 'site.usageClass', message: 'usage class must be 1, 2, 3 or 4' });

  const entered = gate.entered ?? {};
  const input: AssessmentInput = {
    profile: {
      kind: gate.kind,
      leaves: gate.leaves,
      openingDirection: gate.openingDirection ?? undefined,
      usageClass: gate.usageClass as AssessmentInput['profile']['usageClass'],
      leafWidth: dimension(gate.widthMm, entered.width, 'mm'),
      leafHeight: dimension(gate.heightMm, entered.height, 'mm'),
      leafWeight: dimension(gate.weightKg, entered.weight, 'kg'),
      operatorListed: operator.listed as boolean,
      automaticClosing: operator.automaticClosing as boolean,
      operatorManufacturedOn: operator.manufacturedOn ?? undefined,
    },
    site: site as AssessmentInput['site'],
    answers: documents.answers ?? {},
    measurements: documents.measurements ?? {},
    entrapment: observations.entrapment ?? undefined,
    forceTests: observations.forceTests ?? undefined,
    swingGeometry: observations.swingGeometry ?? undefined,
    hrnOverrides: observations.hrnOverrides ?? undefined,
  };
  return { input, missing };
}
