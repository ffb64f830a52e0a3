/**
 * Rulesets in words: a version's name and status, answer types, thresholds with their units
 * (and the other unit system beside them), fact paths as names a technician recognises, a
 * rule's condition as a sentence ("passes when fixed object clearance is at least 406.4 mm
 * (16 in)"), and how a version scores (HRN bands with their edge convention, area caps, the
 * re-inspection plan).
 */
import type { RulesetStatus } from '@/lib/api/rulesets';
import { FACT_CATALOGUE } from '@/lib/rules/fact-catalogue';
import type { HrnTable, RulesetVersion } from '@/lib/rules/ruleset-schema';
import type { UnitSystem } from '@/lib/units';
import { AREA_LABEL } from './assessments';
import { humanise } from './humanise';
import { formatLimit } from './measurements';

/** A ruleset as people name it: "North American automated vehicular gates 2026.1". */
export function rulesetLabel(ruleset: { title?: string | null; family: string; version: string }): string {
  return `${ruleset.title?.trim() || humanise(ruleset.family.replace(/-/g, ' '))} ${ruleset.version}`;
}

/**
 * Published rulesets end many cautions with the same sentence on what the assessment does not
 * replace. The report and the signing page say that once, in the disclaimer; wherever a caution
 * is shown (report, assessment page, ruleset pages and editor) it keeps only its own words. The
 * ruleset files keep the sentence.
 */
const DISCLAIMER_SENTENCE =
  /\s*This (?:assessment|report) supports, and (?:never|does not) replaces?,[^.]*\./gi;

export function cautionWithoutDisclaimer(caution: string): string {
  return caution.replace(DISCLAIMER_SENTENCE, '').trim();
}

export const RULESET_STATUS_LABEL: Record<RulesetStatus, string> = {
  draft: 'Draft',
  published: 'Published',
  retired: 'Retired',
};

export const RULESET_STATUS_CLASS: Record<RulesetStatus, string> = {
  draft: 'bg-brass-100 text-brass-700',
  published: 'bg-clear text-white',
  retired: 'bg-iron-100 text-iron-600',
};

export const ANSWER_TYPE_LABEL: Record<string, string> = {
  yes_no_na: 'Yes / no / not applicable',
  length: 'Length (mm)',
  force: 'Force (N)',
  mass: 'Mass (kg)',
  speed: 'Speed (m/s)',
  time: 'Time (s)',
  voltage: 'Voltage (V)',
  current: 'Current (A)',
  angle: 'Angle (°)',
  count: 'Count',
  choice: 'Choice',
  date: 'Date',
  text: 'Text',
};

// ---------------------------------------------------------------------------------------------
// Thresholds and conditions

export interface ParamLike {
  value: unknown;
  unit?: string;
}

function trimmed(value: number, decimals = 4): string {
  return String(Number(value.toFixed(decimals)));
}

/**
 * A threshold in the organisation's own system, with the trade's rounding: UL 325's 1828.8 mm
 * reads "6 ft" to an imperial organisation, EN 12453's 500 mm "500 mm" to a metric one; an
 * imperial figure that is rounded says "about". The stored value is in the ruleset file.
 */
export function formatParam(param: ParamLike, system: UnitSystem = 'metric'): string {
  const { value, unit } = param;
  if (typeof value !== 'number') return Array.isArray(value) ? value.join(', ') : String(value);
  if (unit === 'count' || unit === undefined) return trimmed(value);
  return formatLimit(value, unit, system);
}

const SUFFIXES = /(Mm|Mps|Kg|Deg|N|S|V|A)$/;

/** `fixedObjectClearanceMm` → "fixed object clearance". */
export function keyWords(key: string): string {
  const stem = key.length > 3 ? key.replace(SUFFIXES, '') : key;
  return stem
    .replace(/([a-z])([A-Z0-9])/g, '$1 $2')
    .replace(/([A-Z])([A-Z][a-z])/g, '$1 $2')
    .replace(/([0-9])([a-zA-Z])/g, '$1 $2')
    .toLowerCase()
    .replace(/^local /, '');
}

/** A fact path as a name: a question's key in words, or the catalogue's label for profile and site facts. */
export function factName(path: string): string {
  const [head, ...rest] = path.split('.');
  if (head === 'answers' || head === 'm') return keyWords(rest.join('.'));
  if (head === 'calc') return rest.map(keyWords).join(' › ');
  const label = FACT_CATALOGUE[path]?.label;
  return label ? label.charAt(0).toLowerCase() + label.slice(1) : keyWords(rest.join(' ') || head);
}

interface WordsContext {
  params: Readonly<Record<string, ParamLike>>;
  system: UnitSystem;
}

const COMPARISONS: Record<string, string> = {
  '>=': 'is at least',
  '<=': 'is at most',
  '>': 'is more than',
  '<': 'is less than',
  '==': 'is',
  '===': 'is',
  '!=': 'is not',
  '!==': 'is not',
};

function literal(value: unknown): string {
  if (typeof value === 'string') return `“${value}”`;
  if (value === null) return 'unknown';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (Array.isArray(value)) return value.map(literal).join(', ');
  return String(value);
}

function words(node: unknown, ctx: WordsContext): string {
  if (node === null || typeof node !== 'object') return literal(node);
  if (Array.isArray(node)) return node.map((n) => words(n, ctx)).join(', ');
  const [op, raw] = Object.entries(node as Record<string, unknown>)[0] ?? ['', []];
  const args = Array.isArray(raw) ? raw : [raw];
  if (op === 'var') {
    const path = String(args[0] ?? '');
    if (path.startsWith('params.')) {
      const param = ctx.params[path.slice('params.'.length)];
      return param ? formatParam(param, ctx.system) : path;
    }
    return factName(path);
  }
  if (op in COMPARISONS) {
    // A three-argument < or <= reads as a range: "between a and c".
    if ((op === '<' || op === '<=') && args.length === 3)
      return `${words(args[1], ctx)} is between ${words(args[0], ctx)} and ${words(args[2], ctx)}`;
    const [a, b] = args;
    // Yes/no facts and answers read as the answer itself: "hinge side guarded: yes".
    const answer =
      b === true
        ? 'yes'
        : b === false
          ? 'no'
          : typeof b === 'string' && ['yes', 'no', 'na'].includes(b)
            ? b === 'na'
              ? 'not applicable'
              : b
            : null;
    if (answer && (op === '==' || op === '===')) return `${words(a, ctx)}: ${answer}`;
    if (answer && (op === '!=' || op === '!==')) return `${words(a, ctx)}: not ${answer}`;
    return `${words(a, ctx)} ${COMPARISONS[op]} ${words(b, ctx)}`;
  }
  switch (op) {
    case 'and':
      return args.length === 1
        ? words(args[0], ctx)
        : `all of: ${args.map((a) => `(${words(a, ctx)})`).join(' and ')}`;
    case 'or':
      return args.length === 1
        ? words(args[0], ctx)
        : `any of: ${args.map((a) => `(${words(a, ctx)})`).join(' or ')}`;
    case '!':
      return `not (${words(args[0], ctx)})`;
    case '!!':
      return `${words(args[0], ctx)} is given`;
    case 'in':
      return `${words(args[0], ctx)} is one of ${words(args[1], ctx)}`;
    case 'if':
    case '?:': {
      const parts: string[] = [];
      for (let i = 0; i + 1 < args.length; i += 2)
        parts.push(`${i === 0 ? 'if' : 'else if'} ${words(args[i], ctx)} then ${words(args[i + 1], ctx)}`);
      if (args.length % 2 === 1) parts.push(`otherwise ${words(args[args.length - 1], ctx)}`);
      return parts.join(', ');
    }
    case 'missing':
    case 'missing_some':
      return `missing ${words(args, ctx)}`;
    case 'min':
      return `the smallest of ${args.map((a) => words(a, ctx)).join(', ')}`;
    case 'max':
      return `the largest of ${args.map((a) => words(a, ctx)).join(', ')}`;
    case '+':
    case '-':
    case '*':
    case '/':
    case '%':
      return args.map((a) => words(a, ctx)).join(` ${op} `);
    case 'some':
    case 'all':
    case 'none':
      return `${op} of ${words(args[0], ctx)} meet (${words(args[1], ctx)})`;
    default:
      return `${op}(${args.map((a) => words(a, ctx)).join(', ')})`;
  }
}

/** A rule's condition (true when the gate passes) as a sentence. */
export function describeCondition(
  logic: unknown,
  params: Readonly<Record<string, ParamLike>>,
  system: UnitSystem = 'metric',
): string {
  return words(logic, { params, system });
}

// ---------------------------------------------------------------------------------------------
// Scoring

/** One band with the range it holds, written out for its edges. */
export interface BandRow {
  key: string;
  label: string;
  range: string;
}

const n = (value: number): string => String(value);

/** The version's edge convention, in one sentence. */
export function bandEdgesSentence(hrn: HrnTable): string {
  return (hrn.bandEdges ?? 'upper_inclusive') === 'lower_inclusive'
    ? 'A value exactly on an edge falls in the higher band (each band starts at its lower edge).'
    : 'A value exactly on an edge falls in the lower band (each band includes its upper edge).';
}

/** Each band with its range: "from 50 up to but not including 100" or "over 50 up to and including 100". */
export function bandRows(hrn: HrnTable): BandRow[] {
  const lowerInclusive = hrn.bandEdges === 'lower_inclusive';
  return hrn.bands.map((band, i) => {
    const from = i === 0 ? null : hrn.bands[i - 1]!.upTo;
    let range: string;
    if (lowerInclusive) {
      if (from === null) range = band.upTo === null ? 'any value' : `under ${n(band.upTo)}`;
      else
        range =
          band.upTo === null
            ? `${n(from)} and over`
            : `from ${n(from)} up to but not including ${n(band.upTo)}`;
    } else if (from === null)
      range = band.upTo === null ? 'any value' : `up to and including ${n(band.upTo)}`;
    else
      range = band.upTo === null ? `over ${n(from)}` : `over ${n(from)} up to and including ${n(band.upTo)}`;
    return { key: band.key, label: band.label, range };
  });
}

/** Scoring facts beyond the bands, one line each (empty when the version says nothing more). */
export function scoringLines(version: RulesetVersion): string[] {
  const lines: string[] = [];
  const w = version.scoring.severityWeights;
  lines.push(
    `Area scores weigh critical rules ${n(w.critical)}, major ${n(w.major)}, minor ${n(w.minor)}; rules that do not apply are left out and unchecked ones count as not passed.`,
  );
  if (version.scoring.criticalFailureAreaCap !== undefined)
    lines.push(
      `An area with a failing critical rule scores at most ${n(version.scoring.criticalFailureAreaCap)}.`,
    );
  const step = version.hrn.likelihoodStepBySeverity;
  if (step) {
    const say = (by: number) =>
      by === 0
        ? 'as derived'
        : by > 0
          ? `${by} step${by === 1 ? '' : 's'} more likely`
          : `${-by} step${by === -1 ? '' : 's'} less likely`;
    lines.push(
      `Default HRN likelihood by severity: critical ${say(step.critical)}, major ${say(step.major)}, minor ${say(step.minor)}.`,
    );
  }
  return lines;
}

/** The re-inspection plan, one line per verdict; empty when the version has none. */
export function reinspectionLines(version: RulesetVersion): string[] {
  const plan = version.reinspection;
  if (!plan) return [];
  const days = (byClass: Record<'1' | '2' | '3' | '4', number>) =>
    (['1', '2', '3', '4'] as const).map((c) => `class ${c}: ${byClass[c]} days`).join(', ');
  return [
    `Clear: ${days(plan.clearAfterDays)}.`,
    `Remedy: ${days(plan.remedyAfterDays)}.`,
    'Withdraw: when the fixes are reported (no calendar date while the gate is out of automatic use).',
  ];
}

const RULE_PARTS =
  'params|severity|enabled|title|remediation|caution|appliesTo|references|reference|condition|area';

/**
 * A field path from a problem or a diff, in words: "params.maxGapMm" → "max gap",
 * "appliesTo.gateKinds" → "applies to › gate kinds". The rule id in "rules.<id>.…" is left
 * out (the card the message sits on names the rule).
 */
export function fieldWords(field: string): string {
  const inRule = field.replace(new RegExp(`^rules\\.[a-z0-9.-]+?\\.(?=(${RULE_PARTS})\\b)`), '');
  const parts = inRule
    .split('.')
    .filter((p) => p && p !== 'params' && p !== 'rules')
    .map((p) => (/^\d+$/.test(p) ? `no. ${Number(p) + 1}` : keyWords(p)));
  return parts.length ? parts.join(' › ') : 'this rule';
}

/** A rule id ("pinch.fixed-objects") as words: "pinch and crush points › fixed objects". */
export function ruleIdWords(id: string): string {
  const [area, ...rest] = id.split('.');
  const areaWords = (AREA_LABEL[area ?? ''] ?? humanise(area ?? '')).toLowerCase();
  return [areaWords, ...rest.map((part) => part.replace(/-/g, ' '))].join(' › ');
}

const RULE_ID = /^[a-z]+(?:\.[a-z0-9]+(?:-[a-z0-9]+)*)+$/;
const LOGIC_FIELDS = /(^|\.)(condition|appliesWhen|askWhen)$/;

/**
 * Any stored ruleset value in words, for the differences between versions: codes humanised,
 * rule ids named, lists and records written out, conditions as sentences.
 */
export function plainValue(value: unknown, unit?: string, field = ''): string {
  if (value === null || value === undefined) return '(none)';
  if (LOGIC_FIELDS.test(field) && typeof value === 'object') return describeCondition(value, {});
  if (typeof value === 'number')
    return unit && unit !== 'count' ? formatParam({ value, unit }) : String(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string') {
    // A family slug ("north-american-gate-local") as words: "North american gate local".
    if (/(^|\.)family$/.test(field)) return humanise(value.replace(/-/g, ' '));
    if (value.includes('.') && RULE_ID.test(value)) return ruleIdWords(value);
    return /^[a-z0-9]+(?:_[a-z0-9]+)+$/.test(value) ? humanise(value).toLowerCase() : value;
  }
  if (Array.isArray(value)) return value.length ? value.map((v) => plainValue(v)).join('; ') : '(none)';
  if (typeof value === 'object')
    return Object.entries(value as Record<string, unknown>)
      .map(([k, v]) => `${keyWords(k)}: ${plainValue(v, undefined, k)}`)
      .join(', ');
  return String(value);
}
