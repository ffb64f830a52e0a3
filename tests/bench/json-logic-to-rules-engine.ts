/**
 * Translates the JSON Logic conditions our rulesets use into json-rules-engine conditions, so the
 * benchmark can time the same rule conditions on the same facts with that library as a
 * reference point. Params are folded in as constants, as our compiler does. Conditions that
 * need arithmetic or `if` (json-rules-engine has no such operators) are reported as untranslated.
 */
import { Engine, type NestedCondition, type TopLevelCondition } from 'json-rules-engine';
import type { RulesetVersion } from '@/lib/rules';

type Condition = NestedCondition;

const FLIP: Record<string, string> = {
  '<': '>',
  '<=': '>=',
  '>': '<',
  '>=': '<=',
  '==': '==',
  '===': '===',
  '!=': '!=',
  '!==': '!==',
};
const OPERATOR: Record<string, { operator: string; negate?: true }> = {
  '==': { operator: 'looseEqual' },
  '===': { operator: 'equal' },
  '!=': { operator: 'looseEqual', negate: true },
  '!==': { operator: 'notEqual' },
  '<': { operator: 'lessThan' },
  '<=': { operator: 'lessThanInclusive' },
  '>': { operator: 'greaterThan' },
  '>=': { operator: 'greaterThanInclusive' },
};

const isLogic = (n: unknown): n is Record<string, unknown> =>
  typeof n === 'object' && n !== null && !Array.isArray(n) && Object.keys(n).length === 1;

function translate(node: unknown, params: Record<string, unknown>): Condition | null {
  if (!isLogic(node)) return null;
  const op = Object.keys(node)[0] as string;
  const raw = node[op];
  const args: unknown[] = Array.isArray(raw) ? raw : [raw];
  if (op === 'and' || op === 'or') {
    const parts = args.map((a) => translate(a, params));
    if (parts.some((p) => p === null)) return null;
    return op === 'and' ? { all: parts as Condition[] } : { any: parts as Condition[] };
  }
  if (op === '!') {
    const inner = translate(args[0], params);
    return inner ? { not: inner } : null;
  }
  if (op === '<=' && args.length === 3) {
    const low = compare('<=', args[0], args[1], params);
    const high = compare('<=', args[1], args[2], params);
    return low && high ? { all: [low, high] } : null;
  }
  if (OPERATOR[op] && args.length === 2) return compare(op, args[0], args[1], params);
  return null;
}

/** A fact path, a constant, or null when the side is itself an expression. */
function side(node: unknown, params: Record<string, unknown>): { fact: string } | { value: unknown } | null {
  if (isLogic(node) && 'var' in node && typeof node.var === 'string') {
    if (node.var.startsWith('params.')) return { value: params[node.var.slice('params.'.length)] };
    return { fact: node.var };
  }
  if (isLogic(node) || Array.isArray(node)) return null;
  return { value: node };
}

function compare(
  op: string,
  left: unknown,
  right: unknown,
  params: Record<string, unknown>,
): Condition | null {
  let a = side(left, params);
  let b = side(right, params);
  if (!a || !b) return null;
  let effective = op;
  if ('value' in a && 'fact' in b) {
    [a, b] = [b, a];
    effective = FLIP[op] as string;
  }
  if (!('fact' in a) || !('value' in b)) return null;
  const mapped = OPERATOR[effective] as { operator: string; negate?: true };
  const condition: Condition = { fact: a.fact, operator: mapped.operator, value: b.value as never };
  return mapped.negate ? { not: condition } : condition;
}

export interface ReferenceEngine {
  engine: Engine;
  translated: number;
  untranslated: string[];
}

/** One json-rules-engine engine holding every translatable enabled rule of a version. */
export function referenceEngineFor(version: RulesetVersion): ReferenceEngine {
  const engine = new Engine([], { allowUndefinedFacts: true });
  // JSON Logic `==` is JavaScript loose equality; json-rules-engine's `equal` is strict.
  engine.addOperator('looseEqual', (a: unknown, b: unknown) => a == b);
  const untranslated: string[] = [];
  let translated = 0;
  for (const rule of version.rules) {
    if (!rule.enabled) continue;
    const params = Object.fromEntries(Object.entries(rule.params).map(([k, p]) => [k, p.value]));
    const condition = translate(rule.condition, params);
    if (!condition) {
      untranslated.push(rule.id);
      continue;
    }
    const conditions: TopLevelCondition =
      'all' in condition || 'any' in condition || 'not' in condition
        ? (condition as TopLevelCondition)
        : { all: [condition] };
    engine.addRule({ name: rule.id, conditions, event: { type: rule.id } });
    translated += 1;
  }
  return { engine, translated, untranslated };
}

/** Facts as json-rules-engine reads them: one fact per dotted path (`m.hingeGapMm`). */
export function flattenFacts(
  facts: unknown,
  prefix = '',
  out: Record<string, unknown> = {},
): Record<string, unknown> {
  if (facts && typeof facts === 'object' && !Array.isArray(facts)) {
    for (const [k, v] of Object.entries(facts)) flattenFacts(v, prefix ? `${prefix}.${k}` : k, out);
  } else if (prefix) {
    out[prefix] = facts;
  }
  return out;
}
