/**
 * Invented walk-through records for the archive's tests and benchmark: a gate profile and the
 * three stored documents (answers, measurements, observations) an auditor could bring back,
 * generated from a ruleset version's own questions with a seeded generator, so the same seed
 * always gives the same record and the engine can score it. Values are plausible, not real.
 */
import { canonicalValue, kindOfUnit } from '../../src/lib/rules/measures';
import type { RulesetQuestion, RulesetVersion } from '../../src/lib/rules';

import { createPrng, type Prng } from '../unit/rules/support/prng';

/** The same seeded generator the rules tests use (mulberry32). */
export { createPrng, type Prng };

/** The gate columns an assessment's `gate_snapshot` keeps and the engine reads. */
export interface SampleGate {
  kind: 'swing' | 'slide';
  leaves: 'single' | 'double';
  openingDirection: 'pull_to_open' | 'push_to_open' | null;
  widthMm: number;
  heightMm: number;
  weightKg: number;
  entered: Record<string, { value: number; unit: string }>;
  operator: {
    listed: boolean;
    automaticClosing: boolean;
    manufacturedOn: string;
    mounting: string;
    power: string;
  };
}

export function sampleGate(prng: Prng): SampleGate {
  const kind = prng.chance(0.6) ? 'swing' : 'slide';
  const widthMm = prng.int(24, 60) * 100;
  const year = prng.int(2004, 2025);
  return {
    kind,
    leaves: kind === 'swing' && prng.chance(0.5) ? 'double' : 'single',
    openingDirection: kind === 'swing' ? prng.pick(['pull_to_open', 'push_to_open'] as const) : null,
    widthMm,
    heightMm: prng.int(12, 24) * 100,
    weightKg: prng.int(60, 400),
    entered: { width: { value: widthMm, unit: 'mm' } },
    operator: {
      listed: prng.chance(0.85),
      automaticClosing: prng.chance(0.4),
      manufacturedOn: `${year}-0${prng.int(1, 9)}-1${prng.int(0, 9)}`,
      mounting: 'post',
      power: prng.chance(0.5) ? 'low_voltage_dc' : 'mains_ac',
    },
  };
}

type Measured = { value: number; unit: string; canonical: number };

/** Entered value ranges per measured kind: wide enough that some gates fail each limit. */
const ranges: Record<string, { unit: string; min: number; max: number; step: number }> = {
  length: { unit: 'mm', min: 0, max: 2400, step: 5 },
  count: { unit: 'count', min: 0, max: 3, step: 1 },
  time: { unit: 's', min: 0, max: 3, step: 0.1 },
  speed: { unit: 'm/s', min: 0.1, max: 0.45, step: 0.01 },
  current: { unit: 'A', min: 1, max: 12, step: 0.5 },
  voltage: { unit: 'V', min: 12, max: 240, step: 12 },
  force: { unit: 'N', min: 50, max: 900, step: 10 },
  mass: { unit: 'kg', min: 20, max: 400, step: 5 },
  angle: { unit: 'deg', min: 0, max: 120, step: 5 },
};

function measured(prng: Prng, question: RulesetQuestion): Measured | undefined {
  const range = ranges[question.answerType];
  if (!range) return undefined;
  const steps = Math.round((range.max - range.min) / range.step);
  let value = Math.round((range.min + prng.int(0, steps) * range.step) * 100) / 100;
  let unit = range.unit;
  // Some auditors measure in inches.
  if (question.answerType === 'length' && prng.chance(0.3)) {
    unit = 'in';
    value = Math.round((value / 25.4) * 4) / 4;
  }
  const kind = kindOfUnit(unit);
  if (!kind) return undefined;
  return { value, unit, canonical: canonicalValue(kind, value, unit) };
}

export interface SampleDocuments {
  answers: Record<string, { value: string }>;
  measurements: Record<string, Measured>;
  observations: {
    site: {
      pedestriansUseDriveway: boolean;
      childrenOrPetsPresent: boolean;
      publicAccess: boolean;
      slopeAcrossSwing: boolean;
    };
    entrapment: {
      zones: { zone: string; direction: string }[];
      devices: { type: string; direction: string; zone: string; monitored: boolean }[];
    };
  };
}

/** Inherent sensing in both directions, a monitored photo-eye closing and an edge opening; careless: the edge missing. */
function sampleEntrapment(prng: Prng, diligence: number): SampleDocuments['observations']['entrapment'] {
  const devices = [
    { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
    { type: 'B1', direction: 'closing', zone: 'closing_edge', monitored: true },
    { type: 'A', direction: 'opening', zone: 'open_side', monitored: true },
  ];
  if (prng.chance(diligence))
    devices.push({ type: 'B2', direction: 'opening', zone: 'open_side', monitored: true });
  return {
    zones: [
      { zone: 'closing_edge', direction: 'closing' },
      { zone: 'open_side', direction: 'opening' },
    ],
    devices,
  };
}

type Logic = unknown;

/**
 * What a gate that passes would show, read from the version's own rule conditions: for
 * `answers.k == v` the answer v, for `m.k <= params.p` a value under the limit, for
 * `m.k >= params.p` one over it. Only simple comparisons are read; the rest stay random.
 */
export function safeAnswersOf(version: Pick<RulesetVersion, 'rules'>): {
  answers: Map<string, string>;
  below: Map<string, number>;
  above: Map<string, number>;
} {
  const answers = new Map<string, string>();
  const below = new Map<string, number>();
  const above = new Map<string, number>();
  const varName = (x: Logic) =>
    x && typeof x === 'object' && 'var' in (x as object) ? String((x as { var: unknown }).var) : null;
  for (const rule of version.rules) {
    const params = Object.fromEntries(Object.entries(rule.params).map(([k, v]) => [`params.${k}`, v.value]));
    const visit = (node: Logic): void => {
      if (!node || typeof node !== 'object' || Array.isArray(node)) return;
      const [op, args] = Object.entries(node as Record<string, Logic>)[0] ?? [];
      if (!op || !Array.isArray(args)) return;
      if (op === 'and') return args.forEach(visit);
      if (op === 'or') return visit(args[0]);
      const left = varName(args[0]);
      const right = varName(args[1]);
      const limit = right ? params[right] : typeof args[1] === 'number' ? args[1] : undefined;
      if (op === '==' && left?.startsWith('answers.') && typeof args[1] === 'string')
        answers.set(left.slice(8), args[1]);
      else if (left?.startsWith('m.') && typeof limit === 'number') {
        if (op === '<=' || op === '<') below.set(left.slice(2), limit);
        if (op === '>=' || op === '>') above.set(left.slice(2), limit);
      }
    };
    visit(rule.condition);
  }
  return { answers, below, above };
}

const safeCache = new WeakMap<object, ReturnType<typeof safeAnswersOf>>();

/**
 * Answers every question of `version` it can. With probability `diligence` an item shows what
 * a passing gate would (see safeAnswersOf), otherwise anything in range, so most gates come out
 * clear and some fail an item or two.
 */
export function sampleDocuments(
  prng: Prng,
  version: Pick<RulesetVersion, 'questions' | 'rules'>,
  diligence = 0.97,
): SampleDocuments {
  let safe = safeCache.get(version);
  if (!safe) safeCache.set(version, (safe = safeAnswersOf(version)));
  const answers: SampleDocuments['answers'] = {};
  const measurements: SampleDocuments['measurements'] = {};
  for (const question of version.questions) {
    const careful = prng.chance(diligence);
    if (question.answerType === 'yes_no_na') {
      answers[question.key] = {
        value: careful ? (safe.answers.get(question.key) ?? 'yes') : prng.pick(['yes', 'no', 'na']),
      };
    } else if (question.answerType === 'choice') {
      const options = question.options ?? [];
      const good = safe.answers.get(question.key);
      if (options.length)
        answers[question.key] = { value: careful && good ? good : prng.pick(options).value };
    } else if (question.answerType === 'date' || question.answerType === 'text') {
      continue;
    } else {
      const m = measured(prng, question);
      if (!m) continue;
      const under = safe.below.get(question.key);
      const over = safe.above.get(question.key);
      if (careful && (under !== undefined || over !== undefined)) {
        const canonical =
          under !== undefined
            ? Math.round(under * 0.6 * 100) / 100
            : Math.round(((over ?? 0) * 1.2 + 1) * 100) / 100;
        const unit = ranges[question.answerType]!.unit;
        measurements[question.key] = {
          value: canonical,
          unit,
          canonical: canonicalValue(kindOfUnit(unit)!, canonical, unit),
        };
      } else measurements[question.key] = m;
    }
  }
  return {
    answers,
    measurements,
    observations: {
      site: {
        pedestriansUseDriveway: prng.chance(0.5),
        childrenOrPetsPresent: prng.chance(0.4),
        publicAccess: prng.chance(0.2),
        slopeAcrossSwing: prng.chance(0.1),
      },
      entrapment: sampleEntrapment(prng, diligence),
    },
  };
}
