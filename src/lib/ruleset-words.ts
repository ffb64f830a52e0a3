/**
 * A ruleset in plain words, for the pages that show one and the amendment editor: thresholds
 * with their units (and the other unit system beside them), fact paths as names a technician
 * recognises, and a rule's JSON Logic condition as a sentence ("passes when fixed object
 * clearance is at least 406.4 mm (16 in)"). Pure; shared by pages and islands.
 */
import { FACT_CATALOGUE } from '@/lib/rules/fact-catalogue';
import { formatLimit } from '@/lib/measure-display';
import type { UnitSystem } from '@/lib/units';

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
