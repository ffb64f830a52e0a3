/**
 * What changed between two ruleset versions, rule by rule and question by question, field by
 * field: the "ruleset impact" page, the amendment editor and the reviewer of a new file all read
 * the same answer (e.g. `params.maxGapMm` 102 → 100, `severity` major → critical).
 */
import { canonicalJson } from './hash';
import type { RulesetVersion } from './ruleset-schema';

export interface FieldChange {
  /** Dotted path inside the rule or question (`params.maxGapMm`, `severity`, `condition`). */
  field: string;
  from: unknown;
  to: unknown;
}

export interface ItemChange {
  id: string;
  title: string;
  changes: FieldChange[];
}

export interface ItemsDiff {
  added: Array<{ id: string; title: string }>;
  removed: Array<{ id: string; title: string }>;
  changed: ItemChange[];
}

export interface RulesetDiff {
  from: { family: string; version: string };
  to: { family: string; version: string };
  rules: ItemsDiff;
  questions: ItemsDiff;
  /** Version-level fields that changed (effectiveFrom, hrn, scoring, sources …). */
  version: FieldChange[];
}

/** Fields compared as one value: JSON Logic and lists are read whole, not element by element. */
const WHOLE = new Set(['condition', 'appliesWhen', 'askWhen']);

function flatten(value: unknown, prefix: string, out: Map<string, unknown>): void {
  const isRecord = typeof value === 'object' && value !== null && !Array.isArray(value);
  if (!isRecord || WHOLE.has(prefix)) {
    out.set(prefix, value);
    return;
  }
  const record = value as Record<string, unknown>;
  // A param is reported by name: `params.maxGapMm` 102 → 100 when only its value moved.
  if (prefix.startsWith('params.') && prefix.split('.').length === 2 && 'value' in record) {
    out.set(prefix, record.value);
    for (const [k, v] of Object.entries(record)) if (k !== 'value') flatten(v, `${prefix}.${k}`, out);
    return;
  }
  for (const [k, v] of Object.entries(record)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
}

/** Field-level changes between two JSON objects, in sorted field order. */
export function fieldChanges(a: unknown, b: unknown): FieldChange[] {
  const left = new Map<string, unknown>();
  const right = new Map<string, unknown>();
  flatten(a, '', left);
  flatten(b, '', right);
  const fields = [...new Set([...left.keys(), ...right.keys()])].sort();
  const changes: FieldChange[] = [];
  for (const field of fields) {
    const from = left.get(field);
    const to = right.get(field);
    if (from === undefined && to === undefined) continue;
    if (from !== undefined && to !== undefined && canonicalJson(from) === canonicalJson(to)) continue;
    changes.push({ field, from: from ?? null, to: to ?? null });
  }
  return changes;
}

function diffItems<T>(
  a: readonly T[],
  b: readonly T[],
  idOf: (item: T) => string,
  titleOf: (item: T) => string,
): ItemsDiff {
  const left = new Map(a.map((item) => [idOf(item), item]));
  const right = new Map(b.map((item) => [idOf(item), item]));
  const sortById = <X extends { id: string }>(items: X[]) =>
    items.sort((x, y) => (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
  const added = sortById(
    [...right].filter(([id]) => !left.has(id)).map(([id, item]) => ({ id, title: titleOf(item) })),
  );
  const removed = sortById(
    [...left].filter(([id]) => !right.has(id)).map(([id, item]) => ({ id, title: titleOf(item) })),
  );
  const changed: ItemChange[] = [];
  for (const [id, before] of left) {
    const after = right.get(id);
    if (after === undefined) continue;
    const changes = fieldChanges(before, after);
    if (changes.length > 0) changed.push({ id, title: titleOf(after), changes });
  }
  return { added, removed, changed: sortById(changed) };
}

/** Rules and questions added, removed and changed from version `a` to version `b`. */
export function diffRulesets(a: RulesetVersion, b: RulesetVersion): RulesetDiff {
  const { rules: rulesA, questions: questionsA, version: _va, ...restA } = a;
  const { rules: rulesB, questions: questionsB, version: _vb, ...restB } = b;
  return {
    from: { family: a.family, version: a.version },
    to: { family: b.family, version: b.version },
    rules: diffItems(
      rulesA,
      rulesB,
      (r) => r.id,
      (r) => r.title,
    ),
    questions: diffItems(
      questionsA,
      questionsB,
      (q) => q.key,
      (q) => q.prompt,
    ),
    version: fieldChanges(restA, restB),
  };
}
