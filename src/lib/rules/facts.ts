/**
 * Turns a parsed assessment input into the fact object rule conditions read: answers as
 * `answers.<key>`, measurements in canonical units as `m.<key>`, the profile and site, and the
 * calculators' results under `calc.*` (see fact-catalogue.ts). A fact whose inputs are missing is
 * left out, never guessed, so the rule that needs it reports needs_info. Evidence a calculator
 * refuses (a force trace sampled too slowly, an impossible operator layout) is listed as a
 * problem with its input path instead of failing the whole assessment.
 */
import { voltageDrop, type Awg } from './calculators/power-wiring';
import { refusal, type EvidenceProblem } from './evidence';
import { POWER_INPUT_KEYS, SIGNAGE_INPUT_KEYS } from './fact-catalogue';
import type { CompiledImpliedZone } from './compile';
import { truthy } from './json-logic-compile';
import { entrapmentFacts, type ZoneAtDirection } from './facts-entrapment';
import { forceFacts } from './facts-force';
import { geometryFacts } from './facts-geometry';
import type { AssessmentInput } from './input';
import { inputEntries, type InputEntries } from './input-entries';

export type { EvidenceProblem } from './evidence';

/** The nested, JSON-ready object conditions read with `{"var": "calc.force.worst.peakN"}`. */
export interface Facts {
  profile: Record<string, unknown>;
  site: Record<string, unknown>;
  answers: Record<string, string>;
  m: Record<string, number>;
  calc: {
    entrapment?: Record<string, unknown>;
    force?: Record<string, unknown>;
    geometry?: Record<string, unknown>;
    power?: Record<string, unknown>;
    signage?: Record<string, unknown>;
  };
}

export interface FactsResult {
  facts: Facts;
  problems: EvidenceProblem[];
}

/** Wire-gauge choice values (`awg10` … `awg18`) the power calculator has resistances for. */
const AWG_BY_CHOICE: Readonly<Record<string, Awg>> = Object.freeze({
  awg10: 10,
  awg12: 12,
  awg14: 14,
  awg16: 16,
  awg18: 18,
});
/** What charges the operator's battery. */
type ChargerSource = 'transformer' | 'solar';

/** Charging-source choice values and the sources each means. */
const CHARGERS_BY_CHOICE: Readonly<Record<string, readonly ChargerSource[]>> = Object.freeze({
  transformer: ['transformer'],
  solar: ['solar'],
  both: ['transformer', 'solar'],
  none: [],
});
const MILLIMETRES_PER_METRE = 1000;

/** What a version adds to fact building: the zones its measurements imply. */
export interface FactOptions {
  impliedZones?: readonly CompiledImpliedZone[] | null;
}

/**
 * Builds the facts for one input. Pure: same input, same facts. `entries`: the input's answers and
 * measurements when the caller has already read them (scoring does).
 */
export function buildFacts(
  input: AssessmentInput,
  options: FactOptions = {},
  entries: InputEntries = inputEntries(input),
): FactsResult {
  const problems: EvidenceProblem[] = [];
  // Keyed by question: each input answers a different subset, so these are dictionaries from the
  // start (no per-subset hidden classes to build) and a key such as `constructor` reads nothing.
  const answers: Record<string, string> = Object.create(null) as Record<string, string>;
  const given = entries.answers;
  for (let i = 0; i < given.keys.length; i++)
    answers[given.keys[i]!] = (given.values[i] as { value: string }).value;
  const m: Record<string, number> = Object.create(null) as Record<string, number>;
  const measurements = entries.measurements;
  for (let i = 0; i < measurements.keys.length; i++)
    m[measurements.keys[i]!] = (measurements.values[i] as { canonical: number }).canonical;

  const facts: Facts = { profile: profileFacts(input), site: { ...input.site }, answers, m, calc: {} };
  if (input.entrapment)
    facts.calc.entrapment = entrapmentFacts(
      input,
      input.entrapment,
      impliedZonesOf(facts, input, options.impliedZones),
    );
  if (input.forceTests && input.forceTests.length > 0)
    facts.calc.force = forceFacts(input.profile.kind, input.forceTests, problems);
  if (input.swingGeometry && input.profile.kind === 'swing') {
    const geometry = geometryFacts(input.swingGeometry, problems);
    if (geometry) facts.calc.geometry = geometry;
  }
  const clearance = operatorClearanceMm(facts, m);
  if (clearance !== null) (facts.calc.geometry ??= {}).operatorLeafClearanceMm = clearance;
  const power = powerFacts(answers, m, problems);
  if (power) facts.calc.power = power;
  const signage = signageFacts(m);
  if (signage) facts.calc.signage = signage;
  return { facts, problems };
}

/** The zones the version's implied-zone conditions find in what was entered (answers, measurements, profile, site). */
function impliedZonesOf(
  facts: Facts,
  input: AssessmentInput,
  zones: readonly CompiledImpliedZone[] | null | undefined,
): ZoneAtDirection[] {
  if (!zones) return [];
  const found: ZoneAtDirection[] = [];
  for (let i = 0; i < zones.length; i++) {
    const z = zones[i]!;
    if (z.gateKinds.has(input.profile.kind) && truthy(z.when(facts)))
      found.push({ zone: z.zone, direction: z.direction });
  }
  return found;
}

/** Question key of the operator-to-leaf clearance measured on site (the alternative to a full ram layout). */
export const MEASURED_OPERATOR_CLEARANCE_KEY = 'operatorLeafClearanceMm';

/**
 * The smallest clearance between the operator and the leaf: the one measured on site, the one
 * the ram layout gives, or the smaller of the two when both are known (the tighter one traps).
 */
function operatorClearanceMm(facts: Facts, m: Record<string, number>): number | null {
  const measured = m[MEASURED_OPERATOR_CLEARANCE_KEY];
  const fromLayout = facts.calc.geometry?.minClearanceMm as number | undefined;
  if (measured === undefined) return fromLayout ?? null;
  return fromLayout === undefined ? measured : Math.min(measured, fromLayout);
}

function profileFacts(input: AssessmentInput): Record<string, unknown> {
  const p = input.profile;
  const profile: Record<string, unknown> = {
    kind: p.kind,
    leaves: p.leaves,
    usageClass: p.usageClass,
    operatorListed: p.operatorListed,
    automaticClosing: p.automaticClosing,
  };
  if (p.openingDirection) profile.openingDirection = p.openingDirection;
  if (p.leafWidth) profile.leafWidthMm = p.leafWidth.canonical;
  if (p.leafHeight) profile.leafHeightMm = p.leafHeight.canonical;
  if (p.leafWeight) profile.leafWeightKg = p.leafWeight.canonical;
  if (p.operatorManufacturedOn) profile.operatorManufacturedOn = p.operatorManufacturedOn;
  return profile;
}

function powerFacts(
  answers: Record<string, string>,
  m: Record<string, number>,
  problems: EvidenceProblem[],
): Record<string, unknown> | null {
  const facts: Record<string, unknown> = {};
  const k = POWER_INPUT_KEYS;
  const chargers = CHARGERS_BY_CHOICE[answers[k.chargingSource] ?? ''];
  // Distinct kinds of source, as the power calculator counts them (several panels on one solar charger count once).
  if (chargers) facts.chargingSourceCount = new Set(chargers).size;
  const awg = AWG_BY_CHOICE[answers[k.wireGauge] ?? ''];
  const conductor = answers[k.conductor];
  const [run, current, supply] = [m[k.runLength], m[k.current], m[k.supply]];
  if (
    awg !== undefined &&
    (conductor === 'solid' || conductor === 'stranded') &&
    run !== undefined &&
    current !== undefined &&
    supply !== undefined
  ) {
    try {
      const drop = voltageDrop({
        awg,
        stranded: conductor === 'stranded',
        oneWayLengthM: run / MILLIMETRES_PER_METRE,
        currentA: current,
        supplyVoltage: supply,
      });
      facts.dropPercent = drop.dropPercent;
      facts.dropV = drop.dropV;
    } catch (error) {
      problems.push(refusal(`measurements.${k.runLength}`, error));
    }
  }
  return Object.keys(facts).length > 0 ? facts : null;
}

function signageFacts(m: Record<string, number>): Record<string, unknown> | null {
  const side1 = m[SIGNAGE_INPUT_KEYS.side1];
  const side2 = m[SIGNAGE_INPUT_KEYS.side2];
  if (side1 === undefined || side2 === undefined) return null;
  // Whole, non-negative counts only; the limits per side and in all are the rule's params.
  if (!Number.isInteger(side1) || !Number.isInteger(side2) || side1 < 0 || side2 < 0) return null;
  return { totalPlacards: side1 + side2 };
}
