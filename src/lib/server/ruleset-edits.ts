/**
 * Local amendments as pure edits of a ruleset document: copy a published version into a draft,
 * and apply an owner's changes (thresholds, severities, rules on or off, local requirements in
 * or out). No I/O: rulesets.ts reads and stores, this decides what the new document is, and
 * `validateRuleset` then judges it like any file in rulesets/.
 *
 * Problems name the field of the request at fault (`rules.pinch.fixed-objects.params.minClearanceMm`,
 * `addRules[0].check.question.key`), so the editor can show each beside its input.
 */
import type { AmendmentPatch, AmendmentProblem, LocalRule, RuleChange } from '@/lib/api/rulesets';
import { LOCAL_RULE_PREFIX } from '@/lib/api/rulesets';
import { CANONICAL_UNIT_OF, type MeasuredAnswerType } from '@/lib/rules/measures';
import { KEY_SUFFIX_OF } from '@/lib/rules/ruleset-references';
import type { RulesetQuestion, RulesetRule, RulesetVersion } from '@/lib/rules/ruleset-schema';
import { USAGE_CLASSES } from '@/lib/rules/vocabulary';

const FAMILY_TITLE_MAX = 160;

/** The label of the next amendment of `sourceVersion` in a family already holding `existing`: `2026.1-local.3`. */
export function nextLocalVersionLabel(sourceVersion: string, existing: readonly string[]): string {
  const base = sourceVersion.split('-')[0];
  const pattern = new RegExp(`^${base.replace('.', '\\.')}-local\\.(\\d+)$`);
  let highest = 0;
  for (const label of existing) {
    const match = pattern.exec(label);
    if (match) highest = Math.max(highest, Number(match[1]));
  }
  return `${base}-local.${highest + 1}`;
}

/** Title of a new local family, kept within the schema's 160 characters. */
export function localFamilyTitle(sourceTitle: string, organisationName: string): string {
  const title = `${sourceTitle}, as amended by ${organisationName}`;
  return title.length <= FAMILY_TITLE_MAX ? title : `${title.slice(0, FAMILY_TITLE_MAX - 1).trimEnd()}…`;
}

/** A draft's content: the source copied whole, renamed into the local family and pointing back at its source. */
export function amendmentContent(
  source: RulesetVersion,
  sourceSha256: string,
  target: { family: string; familyTitle: string; version: string },
): RulesetVersion {
  const copy = structuredClone(source);
  return {
    ...copy,
    family: target.family,
    familyTitle: target.familyTitle,
    version: target.version,
    derivedFrom: { family: source.family, version: source.version, contentSha256: sourceSha256 },
  };
}

type Edit = { ok: true; content: RulesetVersion } | { ok: false; problems: AmendmentProblem[] };

/**
 * Applies a patch to a draft: removals first, then changes to the rules left, then additions.
 * `baseline` is the version the draft was derived from: questions and sources it already had are
 * never pruned when a local rule goes.
 */
export function applyAmendment(
  draft: RulesetVersion,
  patch: AmendmentPatch,
  baseline: RulesetVersion | null,
): Edit {
  const content = structuredClone(draft);
  const problems: AmendmentProblem[] = [];

  (patch.removeRules ?? []).forEach((id, i) => removeRule(content, id, `removeRules[${i}]`, problems));
  for (const [id, change] of Object.entries(patch.rules ?? {})) changeRule(content, id, change, problems);
  (patch.addRules ?? []).forEach((rule, i) => addLocalRule(content, rule, `addRules[${i}]`, problems));
  if (patch.removeRules?.length) pruneOrphans(content, baseline);

  return problems.length ? { ok: false, problems } : { ok: true, content };
}

function removeRule(content: RulesetVersion, id: string, field: string, problems: AmendmentProblem[]): void {
  const index = content.rules.findIndex((r) => r.id === id);
  if (index < 0) {
    problems.push({ field, message: `no rule "${id}" in this draft`, ruleId: id });
    return;
  }
  if (!content.rules[index].local) {
    problems.push({
      field,
      message: 'a shipped rule cannot be removed; turn it off instead (enabled: false)',
      ruleId: id,
    });
    return;
  }
  content.rules.splice(index, 1);
}

function changeRule(
  content: RulesetVersion,
  id: string,
  change: RuleChange,
  problems: AmendmentProblem[],
): void {
  const at = `rules.${id}`;
  const rule = content.rules.find((r) => r.id === id);
  if (!rule) {
    problems.push({ field: at, message: `no rule "${id}" in this draft`, ruleId: id });
    return;
  }
  if (change.severity !== undefined) rule.severity = change.severity;
  if (change.enabled !== undefined) rule.enabled = change.enabled;
  for (const [name, value] of Object.entries(change.params ?? {})) {
    const field = `${at}.params.${name}`;
    const param = rule.params[name];
    if (!param) {
      const names = Object.keys(rule.params);
      problems.push({
        field,
        message: names.length
          ? `"${id}" has no param "${name}" (it has ${names.join(', ')})`
          : `"${id}" has no params`,
        ruleId: id,
      });
      continue;
    }
    const wrongType = typeMismatch(param.value, value);
    if (wrongType) {
      problems.push({
        field,
        message:
          'unit' in param ? `${wrongType} in ${param.unit}; the unit stays as the rule has it` : wrongType,
        ruleId: id,
      });
      continue;
    }
    if (typeof value === 'number' && value < 0) {
      problems.push({ field, message: 'must not be negative', ruleId: id });
      continue;
    }
    // Only the value moves: the unit and any note stay as the rule has them.
    rule.params[name] = { ...param, value } as RulesetRule['params'][string];
  }
}

function typeMismatch(before: unknown, after: unknown): string | null {
  const kind = (v: unknown) => (Array.isArray(v) ? 'list' : typeof v);
  const expected = kind(before);
  if (expected === kind(after)) return null;
  const words: Record<string, string> = {
    number: 'must be a number',
    string: 'must be a word or phrase',
    boolean: 'must be true or false',
    list: 'must be a list',
  };
  return words[expected] ?? `must be a ${expected}`;
}

function words(title: string): string[] {
  return title
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim()
    .split(' ')
    .filter(Boolean);
}

function uniqueName(
  base: string,
  taken: (name: string) => boolean,
  withNumber: (n: number) => string,
): string {
  if (!taken(base)) return base;
  for (let n = 2; ; n++) if (!taken(withNumber(n))) return withNumber(n);
}

function generatedRuleId(rule: LocalRule, content: RulesetVersion): string {
  const slug = words(rule.title).join('-').slice(0, 60).replace(/-+$/, '') || 'requirement';
  const base = `${LOCAL_RULE_PREFIX}${slug}`;
  return uniqueName(
    base,
    (id) => content.rules.some((r) => r.id === id),
    (n) => `${base}-${n}`,
  );
}

function generatedQuestionKey(title: string, suffix: string, content: RulesetVersion): string {
  const camel = words(title)
    .map((w) => w[0].toUpperCase() + w.slice(1))
    .join('')
    .slice(0, 63 - 'local'.length - suffix.length - 2);
  const stem = `local${camel || 'Check'}`;
  return uniqueName(
    `${stem}${suffix}`,
    (key) => content.questions.some((q) => q.key === key),
    (n) => `${stem}${n}${suffix}`,
  );
}

/** The id of a `local` source for the reference's code or authority, added when new. */
function localSourceId(content: RulesetVersion, standard: string): string {
  const existing = content.sources.find((s) => s.kind === 'local' && s.title === standard);
  if (existing) return existing.id;
  const id = uniqueName(
    'localSource',
    (key) => content.sources.some((s) => s.id === key),
    (n) => `localSource${n}`,
  );
  content.sources.push({
    id,
    title: standard,
    kind: 'local',
    note: 'Added by the organisation as a local amendment.',
  });
  return id;
}

function addLocalRule(
  content: RulesetVersion,
  local: LocalRule,
  at: string,
  problems: AmendmentProblem[],
): void {
  const id = local.id ?? generatedRuleId(local, content);
  if (content.rules.some((r) => r.id === id)) {
    problems.push({ field: `${at}.id`, message: `a rule "${id}" is already in this draft`, ruleId: id });
    return;
  }
  const { check } = local;
  let condition: unknown;
  let requires: string[];
  let optional: string[] | undefined;
  let params: RulesetRule['params'] = {};

  if (check.kind === 'condition') {
    condition = check.condition;
    requires = check.requires;
    optional = check.optional;
    params = (check.params ?? {}) as RulesetRule['params'];
  } else {
    const measure: MeasuredAnswerType | null = check.kind === 'answer_yes' ? null : check.question.measure;
    const suffix = measure ? KEY_SUFFIX_OF[measure] : '';
    const key = check.question.key ?? generatedQuestionKey(local.title, suffix, content);
    const keyField = `${at}.check.question.key`;
    if (content.questions.some((q) => q.key === key)) {
      problems.push({ field: keyField, message: `a question "${key}" is already in this draft`, ruleId: id });
      return;
    }
    if (suffix && !key.endsWith(suffix)) {
      problems.push({
        field: keyField,
        message: `a ${measure} in ${CANONICAL_UNIT_OF[measure!]} needs a key ending in "${suffix}"`,
        ruleId: id,
      });
      return;
    }
    const question: RulesetQuestion = {
      key,
      section: check.question.section,
      area: local.area,
      prompt: check.question.prompt,
      whyItMatters: check.question.whyItMatters,
      answerType: measure ?? 'yes_no_na',
      gateKinds: [...local.gateKinds],
    };
    content.questions.push(question);
    if (check.kind === 'answer_yes') {
      condition = { '==': [{ var: `answers.${key}` }, 'yes'] };
      requires = [`answers.${key}`];
    } else {
      const operator = check.kind === 'at_least' ? '>=' : '<=';
      condition = { [operator]: [{ var: `m.${key}` }, { var: 'params.limit' }] };
      requires = [`m.${key}`];
      params = { limit: { value: check.limit, unit: CANONICAL_UNIT_OF[measure!] } } as RulesetRule['params'];
    }
  }

  const rule: RulesetRule = {
    id,
    title: local.title,
    area: local.area,
    severity: local.severity,
    appliesTo: { gateKinds: [...local.gateKinds], usageClasses: [...(local.usageClasses ?? USAGE_CLASSES)] },
    condition: condition as RulesetRule['condition'],
    requires,
    ...(optional ? { optional } : {}),
    params,
    harm: local.harm,
    remediation: local.remediation,
    caution: local.caution,
    reference: {
      standard: local.reference.standard,
      clause: local.reference.clause,
      source: localSourceId(content, local.reference.standard),
      ...(local.reference.note ? { note: local.reference.note } : {}),
    },
    enabled: true,
    local: true,
  };
  content.rules.push(rule);
}

/** Questions and local sources that only removed local rules used, and the baseline never had. */
function pruneOrphans(content: RulesetVersion, baseline: RulesetVersion | null): void {
  const baseQuestions = new Set(baseline?.questions.map((q) => q.key) ?? []);
  const baseSources = new Set(baseline?.sources.map((s) => s.id) ?? []);
  const ruleText = content.rules.map((r) => JSON.stringify(r)).join('\n');
  const askText = content.questions.map((q) => JSON.stringify(q.askWhen ?? null)).join('\n');
  const stillRead = (key: string) =>
    [`"answers.${key}"`, `"m.${key}"`].some((fact) => ruleText.includes(fact) || askText.includes(fact));
  content.questions = content.questions.filter((q) => baseQuestions.has(q.key) || stillRead(q.key));
  const usedSources = new Set(content.rules.map((r) => r.reference.source).filter(Boolean));
  content.sources = content.sources.filter(
    (s) => s.kind !== 'local' || baseSources.has(s.id) || usedSources.has(s.id),
  );
}
