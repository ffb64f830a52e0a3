/**
 * Generates varied, valid assessment inputs for a ruleset version from a seed: every question the
 * version asks may be answered, left out or marked n/a; measured values land near the rules'
 * own thresholds half the time, so passes, fails and needs-info all occur. Used by the
 * compiled-vs-reference equivalence test and by the scoring benchmark.
 */
import { measure, type LengthUnit } from '@/lib/units';
import type { AssessmentInput, ForceTest, RulesetVersion } from '@/lib/rules';
import { ENTRAPMENT_ZONES } from '@/lib/rules';
import type { Prng } from './prng';

const KINDS = [
  'swing',
  'swing',
  'swing',
  'slide',
  'slide',
  'slide',
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
] as const;
const DEVICE_TYPES = ['A', 'A', 'B1', 'B1', 'B2', 'B2', 'C', 'D', 'E'] as const;
const LENGTH_UNITS: LengthUnit[] = ['mm', 'mm', 'in', 'ft', 'cm'];

/** Numeric params of the rules that read each measured fact: the values worth landing near. */
const thresholdCache = new WeakMap<RulesetVersion, Map<string, number[]>>();

function thresholdsByFact(version: RulesetVersion): Map<string, number[]> {
  const cached = thresholdCache.get(version);
  if (cached) return cached;
  const map = new Map<string, number[]>();
  thresholdCache.set(version, map);
  for (const rule of version.rules) {
    const numbers = Object.values(rule.params).flatMap((p) => (typeof p.value === 'number' ? [p.value] : []));
    for (const fact of rule.requires) map.set(fact, [...(map.get(fact) ?? []), ...numbers]);
  }
  return map;
}

const round = (value: number, decimals: number) => Math.round(value * 10 ** decimals) / 10 ** decimals;

function measuredValue(rng: Prng, answerType: string, near: number[]) {
  const base =
    near.length > 0 && rng.chance(0.6)
      ? rng.pick(near) * (0.8 + rng.next() * 0.4)
      : Math.exp(rng.next() * Math.log(5000));
  switch (answerType) {
    case 'length': {
      const unit = rng.pick(LENGTH_UNITS);
      const factor = unit === 'mm' ? 1 : unit === 'cm' ? 10 : unit === 'in' ? 25.4 : 304.8;
      return measure('length', round(base / factor, 2), unit);
    }
    case 'force':
      return measure('force', round(base, 1), 'N');
    case 'mass':
      return rng.chance(0.5)
        ? measure('mass', round(base / 10, 1), 'kg')
        : measure('mass', round(base / 4.5, 1), 'lb');
    case 'speed':
      return measure('speed', round(near.length ? base : rng.next(), 3), 'm/s');
    case 'count': {
      const n = rng.int(0, 3);
      return { value: n, unit: 'count', canonical: n };
    }
    case 'time': {
      const s = round(near.length ? base : rng.next() * 4, 2);
      return { value: s, unit: 's', canonical: s };
    }
    case 'voltage': {
      const v = rng.pick([12, 24, 24, 36]);
      return { value: v, unit: 'V', canonical: v };
    }
    case 'current': {
      const a = round(0.5 + rng.next() * 8, 1);
      return { value: a, unit: 'A', canonical: a };
    }
    default: {
      const deg = round(rng.next() * 180, 1);
      return { value: deg, unit: 'deg', canonical: deg };
    }
  }
}

function forceTest(rng: Prng, withSamples: boolean): ForceTest {
  const gapMm = rng.pick([50, 300, 500, 800, 1200, 30]);
  if (withSamples && gapMm >= 50) {
    const rate = rng.pick([100, 200, 500]);
    const peak = 150 + rng.next() * 600;
    const samples = Array.from({ length: rate * 7 }, (_, i) => {
      const t = i / rate;
      const f =
        t < 0.5
          ? 0
          : t < 1
            ? peak * (t - 0.5) * 2
            : t < 1.5
              ? peak * (1.5 - t) * 2 + 20
              : 20 * Math.max(0, 3 - t);
      return { t: round(t, 4), f: round(f, 1) };
    });
    return { location: 'closing_edge', direction: 'closing', gapMm, samples };
  }
  return {
    location: rng.pick(['closing_edge', 'opening_edge'] as const),
    direction: rng.pick(['closing', 'opening'] as const),
    gapMm,
    summary: {
      peakN: round(100 + rng.next() * 1500, 1),
      durationAbove150S: round(rng.next(), 3),
      staticN: round(rng.next() * 250, 1),
      residualAt5sN: round(rng.next() * 40, 1),
    },
  };
}

/** One generated input for `version`. */
export function generateInput(rng: Prng, version: RulesetVersion): AssessmentInput {
  const kind = rng.pick(KINDS);
  const thresholds = thresholdsByFact(version);
  const input: AssessmentInput = {
    profile: {
      kind,
      leaves: rng.pick(['single', 'double'] as const),
      usageClass: rng.pick([1, 2, 3, 4] as const),
      operatorListed: rng.chance(0.9),
      automaticClosing: rng.chance(0.7),
    },
    site: {
      pedestriansUseDriveway: rng.chance(0.5),
      childrenOrPetsPresent: rng.chance(0.4),
      publicAccess: rng.chance(0.3),
      slopeAcrossSwing: rng.chance(0.3),
    },
    answers: {},
    measurements: {},
  };
  if (kind === 'swing') input.profile.openingDirection = rng.pick(['pull_to_open', 'push_to_open'] as const);
  if (rng.chance(0.8)) input.profile.leafWidth = measure('length', rng.int(2000, 9000), 'mm');
  if (rng.chance(0.8)) input.profile.leafHeight = measure('length', rng.int(48, 96), 'in');
  if (rng.chance(0.8)) input.profile.leafWeight = measure('mass', rng.int(20, 600), 'kg');
  if (rng.chance(0.9))
    input.profile.operatorManufacturedOn = `${rng.int(2005, 2025)}-${String(rng.int(1, 12)).padStart(2, '0')}-${String(rng.int(1, 28)).padStart(2, '0')}`;

  for (const q of version.questions) {
    if (!q.gateKinds.includes(kind) || rng.chance(0.12)) continue;
    if (q.answerType === 'yes_no_na')
      input.answers![q.key] = { value: rng.pick(['yes', 'yes', 'yes', 'no', 'na'] as const) };
    else if (q.answerType === 'choice') input.answers![q.key] = { value: rng.pick(q.options!).value };
    else if (q.answerType === 'date' || q.answerType === 'text')
      input.answers![q.key] = { value: '2024-01-01' };
    else input.measurements![q.key] = measuredValue(rng, q.answerType, thresholds.get(`m.${q.key}`) ?? []);
  }

  if (rng.chance(0.9)) {
    const zoneCount = rng.int(0, 3);
    const devices = Array.from({ length: rng.int(0, 5) }, () => ({
      type: rng.pick(DEVICE_TYPES),
      direction: rng.pick(['closing', 'opening'] as const),
      zone: rng.pick(ENTRAPMENT_ZONES),
      monitored: rng.chance(0.7),
    }));
    input.entrapment = {
      zones: Array.from({ length: zoneCount }, () => ({
        zone: rng.pick(ENTRAPMENT_ZONES),
        direction: rng.pick(['closing', 'opening'] as const),
      })),
      devices,
    };
    if (rng.chance(0.05)) input.entrapment.edition = rng.pick(['pre-2016', '2016'] as const);
  }
  if (rng.chance(0.5)) {
    const withSamples = rng.chance(0.02);
    input.forceTests = Array.from({ length: rng.int(1, 5) }, (_, i) =>
      forceTest(rng, withSamples && i === 0),
    );
  }
  if (kind === 'swing' && rng.chance(0.5)) {
    input.swingGeometry = {
      aMm: rng.int(80, 250),
      bMm: rng.int(-50, 300) || 100,
      bracketFromHingeMm: rng.int(700, 1300),
      retractedLengthMm: rng.int(700, 950),
      strokeMm: rng.int(300, 500),
      targetOpeningDeg: rng.pick([80, 90, 90, 100, 110]),
      bracketOffsetMm: rng.int(0, 150),
    };
  }
  if (rng.chance(0.05)) {
    const rule = rng.pick(version.rules);
    input.hrnOverrides = { [rule.id]: { lo: 'likely', reason: 'Children seen playing at the gate' } };
  }
  return input;
}
