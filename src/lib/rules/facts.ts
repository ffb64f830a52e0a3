/**
 * Turns a parsed assessment input into the fact object rule conditions read: answers as
 * `answers.<key>`, measurements in canonical units as `m.<key>`, the profile and site, and the
 * calculators' results under `calc.*` (see fact-catalogue.ts). A fact whose inputs are missing is
 * left out, never guessed, so the rule that needs it reports needs_info. Evidence a calculator
 * refuses (a force trace sampled too slowly, an impossible operator layout) is listed as a
 * problem with its input path instead of failing the whole assessment.
 */
import { assessEntrapmentProtection, type FittedDevice } from './calculators/entrapment-protection';
import { EN12453_GAP_ZONE_MM, evaluateForceTrace } from './calculators/force-trace';
import { ForceTraceError } from './calculators/force-trace-error';
import { voltageDrop, type Awg, type ChargerSource } from './calculators/power-wiring';
import { assessSignage } from './calculators/controls-signage';
import { assessSwingOperatorGeometry } from './calculators/swing-geometry';
import { POWER_INPUT_KEYS, SIGNAGE_INPUT_KEYS } from './fact-catalogue';
import type { AssessmentInput, EntrapmentInput, ForceTest } from './input';
import type { GateKind } from './vocabulary';

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

/** Evidence a calculator refused, with the input path to fix. */
export interface EvidenceProblem {
  path: string;
  code: string;
  message: string;
}

export interface FactsResult {
  facts: Facts;
  problems: EvidenceProblem[];
}

/** Wire-gauge choice values (`awg10` … `awg18`) the power calculator has resistances for. */
const AWG_BY_CHOICE: Readonly<Record<string, Awg>> = Object.freeze({ awg10: 10, awg12: 12, awg14: 14, awg16: 16, awg18: 18 });
/** Charging-source choice values and the sources each means. */
const CHARGERS_BY_CHOICE: Readonly<Record<string, readonly ChargerSource[]>> = Object.freeze({
  transformer: ['transformer'],
  solar: ['solar'],
  both: ['transformer', 'solar'],
  none: [],
});
/** Gate kinds EN 12453 holds to 400 N whatever the gap: their tests count with the small-gap ones. */
const FOUR_HUNDRED_NEWTON_KINDS: ReadonlySet<GateKind> = new Set(['barrier_arm', 'vertical_lift', 'vertical_pivot', 'overhead_pivot']);
const MILLIMETRES_PER_METRE = 1000;

/** Builds the facts for one input. Pure: same input, same facts. */
export function buildFacts(input: AssessmentInput): FactsResult {
  const problems: EvidenceProblem[] = [];
  const answers: Record<string, string> = {};
  for (const [key, answer] of Object.entries(input.answers ?? {})) answers[key] = answer.value;
  for (const [key, choice] of Object.entries(input.choices ?? {})) answers[key] = choice.value;
  const m: Record<string, number> = {};
  for (const [key, measured] of Object.entries(input.measurements ?? {})) m[key] = measured.canonical;

  const facts: Facts = { profile: profileFacts(input), site: { ...input.site }, answers, m, calc: {} };
  if (input.entrapment) facts.calc.entrapment = entrapmentFacts(input, input.entrapment);
  if (input.forceTests && input.forceTests.length > 0) facts.calc.force = forceFacts(input.profile.kind, input.forceTests, problems);
  if (input.swingGeometry && input.profile.kind === 'swing') {
    const geometry = geometryFacts(input.swingGeometry, problems);
    if (geometry) facts.calc.geometry = geometry;
  }
  const power = powerFacts(answers, m, problems);
  if (power) facts.calc.power = power;
  const signage = signageFacts(m);
  if (signage) facts.calc.signage = signage;
  return { facts, problems };
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

function entrapmentFacts(input: AssessmentInput, e: EntrapmentInput): Record<string, unknown> {
  const devices: Record<'opening' | 'closing', FittedDevice[]> = { opening: [], closing: [] };
  for (const d of e.devices) devices[d.direction].push({ type: d.type, monitored: d.monitored });
  const zones = { opening: e.zones.some((z) => z.direction === 'opening'), closing: e.zones.some((z) => z.direction === 'closing') };
  const judged = assessEntrapmentProtection({
    gateKind: input.profile.kind,
    usageClass: input.profile.usageClass,
    automaticClosing: input.profile.automaticClosing,
    manufacturedOn: input.profile.operatorManufacturedOn ?? null,
    edition: e.edition ?? null,
    devices,
    entrapmentZones: zones,
  });
  const facts: Record<string, unknown> = {
    deviceCount: e.devices.length,
    zonesWithoutExternalSensor: e.zones.filter(
      (z) => !e.devices.some((d) => d.zone === z.zone && d.direction === z.direction && (d.type === 'B1' || d.type === 'B2')),
    ).length,
    unmonitoredExternal: e.devices.filter((d) => (d.type === 'B1' || d.type === 'B2') && !d.monitored).length,
    typeDWithAutoClose: input.profile.automaticClosing && e.devices.some((d) => d.type === 'D'),
  };
  if (judged.applicableEdition) facts.rules2016 = judged.applicableEdition === '2016';
  for (const direction of ['closing', 'opening'] as const) {
    const pre = judged.byEdition['pre-2016'][direction];
    const now = judged.byEdition['2016'][direction];
    const external = e.devices.filter((d) => d.direction === direction && (d.type === 'B1' || d.type === 'B2'));
    const side: Record<string, unknown> = {
      zone: zones[direction],
      countedTypes2016: now.countedTypes.length,
      externalSensors: external.length,
      monitoredSensors: external.filter((d) => d.monitored).length,
    };
    if (pre.compliant !== null) side.compliantPre2016 = pre.compliant;
    if (now.compliant !== null) side.compliant2016 = now.compliant;
    facts[direction] = side;
  }
  return facts;
}

interface ForceFigures {
  peakN: number;
  durationAbove150S: number;
  staticN: number;
  residualAt5sN: number;
  smallGap: boolean;
}

/** A refusal found without running the trace calculator (no Error built: these are common and cheap to say). */
interface Refused {
  code: string;
  message: string;
}

function forceFigures(kind: GateKind, test: ForceTest): ForceFigures | Refused {
  if (test.samples) {
    const r = evaluateForceTrace(test.samples, { gateKind: kind, gapMm: test.gapMm });
    return {
      peakN: r.peak,
      durationAbove150S: r.durationAbove150,
      staticN: r.staticForce,
      residualAt5sN: r.residualAt5s,
      smallGap: FOUR_HUNDRED_NEWTON_KINDS.has(kind) || r.zone !== 'gap_over_500',
    };
  }
  if (test.gapMm < EN12453_GAP_ZONE_MM.min) {
    return { code: 'gap_not_covered', message: `A ${test.gapMm} mm gap is below the ${EN12453_GAP_ZONE_MM.min} mm measuring point` };
  }
  const s = test.summary as NonNullable<ForceTest['summary']>;
  return {
    peakN: s.peakN,
    durationAbove150S: s.durationAbove150S,
    staticN: s.staticN,
    residualAt5sN: s.residualAt5sN,
    smallGap: FOUR_HUNDRED_NEWTON_KINDS.has(kind) || test.gapMm <= EN12453_GAP_ZONE_MM.max,
  };
}

function forceFacts(kind: GateKind, tests: readonly ForceTest[], problems: EvidenceProblem[]): Record<string, unknown> {
  const accepted: ForceFigures[] = [];
  let rejected = 0;
  tests.forEach((test, i) => {
    try {
      const figures = forceFigures(kind, test);
      if ('code' in figures) {
        rejected += 1;
        problems.push({ path: `forceTests[${i}]`, code: figures.code, message: figures.message });
      } else accepted.push(figures);
    } catch (error) {
      rejected += 1;
      problems.push(refusal(`forceTests[${i}]`, error));
    }
  });
  const facts: Record<string, unknown> = { testCount: accepted.length, rejectedTraces: rejected };
  if (accepted.length === 0) return facts;
  const max = (pick: (f: ForceFigures) => number, from: ForceFigures[] = accepted) => Math.max(...from.map(pick));
  facts.worst = {
    peakN: max((f) => f.peakN),
    durationAbove150S: max((f) => f.durationAbove150S),
    staticN: max((f) => f.staticN),
    residualAt5sN: max((f) => f.residualAt5sN),
  };
  const small = accepted.filter((f) => f.smallGap);
  const large = accepted.filter((f) => !f.smallGap);
  if (small.length > 0) facts.smallGapMaxPeakN = max((f) => f.peakN, small);
  if (large.length > 0) facts.largeGapMaxPeakN = max((f) => f.peakN, large);
  return facts;
}

/**
 * The geometry sweep samples the whole swing and is by far the dearest calculator, while the
 * walk-through re-scores the same gate after every answer: recent layouts are remembered.
 */
const GEOMETRY_MEMO_SIZE = 256;
const geometryMemo = new Map<string, Record<string, unknown> | EvidenceProblem>();

function geometryFacts(g: NonNullable<AssessmentInput['swingGeometry']>, problems: EvidenceProblem[]): Record<string, unknown> | null {
  const key = [g.aMm, g.bMm, g.bracketFromHingeMm, g.retractedLengthMm, g.strokeMm, g.targetOpeningDeg, g.bracketOffsetMm, g.leafThicknessMm, g.operatorHalfWidthMm, g.operatorBodyLengthMm].join('|');
  let found = geometryMemo.get(key);
  if (!found) {
    try {
      const r = assessSwingOperatorGeometry(g);
      found = { minClearanceMm: r.minClearanceMm, swingReachable: r.swingReachable, passesDeadCentre: r.passesDeadCentre, minLeverArmMm: r.minLeverArmMm };
    } catch (error) {
      found = refusal('swingGeometry', error);
    }
    if (geometryMemo.size >= GEOMETRY_MEMO_SIZE) geometryMemo.delete(geometryMemo.keys().next().value as string);
    geometryMemo.set(key, found);
  }
  if ('code' in found && 'path' in found) {
    problems.push({ ...(found as EvidenceProblem) });
    return null;
  }
  return { ...found };
}

function powerFacts(answers: Record<string, string>, m: Record<string, number>, problems: EvidenceProblem[]): Record<string, unknown> | null {
  const facts: Record<string, unknown> = {};
  const k = POWER_INPUT_KEYS;
  const chargers = CHARGERS_BY_CHOICE[answers[k.chargingSource] ?? ''];
  // Distinct kinds of source, as the power calculator counts them (several panels on one solar charger count once).
  if (chargers) facts.chargingSourceCount = new Set(chargers).size;
  const awg = AWG_BY_CHOICE[answers[k.wireGauge] ?? ''];
  const conductor = answers[k.conductor];
  const [run, current, supply] = [m[k.runLength], m[k.current], m[k.supply]];
  if (awg !== undefined && (conductor === 'solid' || conductor === 'stranded') && run !== undefined && current !== undefined && supply !== undefined) {
    try {
      const drop = voltageDrop({ awg, stranded: conductor === 'stranded', oneWayLengthM: run / MILLIMETRES_PER_METRE, currentA: current, supplyVoltage: supply });
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
  if (!Number.isInteger(side1) || !Number.isInteger(side2) || side1 < 0 || side2 < 0) return null;
  const total = assessSignage({ placardsGateSide1: side1, placardsGateSide2: side2 }).total.count;
  return total === null ? null : { totalPlacards: total };
}

function refusal(path: string, error: unknown): EvidenceProblem {
  if (error instanceof ForceTraceError) return { path, code: error.code, message: error.message };
  if (error instanceof RangeError) return { path, code: 'out_of_range', message: error.message };
  throw error;
}
