/**
 * A scoring result as JSON.stringify writes it (the same bytes, a unit test holds them equal),
 * for an endpoint's answer. Most of a result (tens of kilobytes) is rule text repeated in every
 * result: each finding's rule id, title, area and severity, and its params, remediation, caution
 * and reference. Those are written once per compiled rule and reused; only the outcome, what is
 * missing, what was observed and the HRN are written per finding. A finding that is not exactly
 * what the engine makes for its rule (a key added or missing, a value replaced) is written by
 * JSON.stringify instead, so the answer never differs from the result it stands for.
 */
import type { CompiledRule, CompiledRuleset } from './compile';
import type { Finding, ScoreResult } from './result-types';

/** A finding's members, in the order the engine creates them (`local` and `hrn` may follow). */
const FINDING_KEYS = [
  'ruleId',
  'title',
  'area',
  'severity',
  'outcome',
  'missing',
  'observed',
  'params',
  'remediation',
  'caution',
  'reference',
] as const;

/** A rule's written text: `{"ruleId":…,"severity":…` before the outcome, `"params":…,"reference":…` (and `local`) after the observed values. */
interface RuleText {
  head: string;
  tail: string;
}

const ruleTexts = new WeakMap<CompiledRule, RuleText>();

function textOf(compiledRule: CompiledRule): RuleText {
  let text = ruleTexts.get(compiledRule);
  if (!text) {
    const { rule } = compiledRule;
    const head = JSON.stringify({
      ruleId: rule.id,
      title: rule.title,
      area: rule.area,
      severity: rule.severity,
    });
    const tail = JSON.stringify({
      params: compiledRule.findingParams,
      remediation: rule.remediation,
      caution: rule.caution,
      reference: rule.reference,
      ...(rule.local ? { local: true } : {}),
    });
    text = { head: head.slice(0, -1), tail: tail.slice(1, -1) };
    ruleTexts.set(compiledRule, text);
  }
  return text;
}

/** True when the finding is the engine's own for this rule: its members in order, the rule's text unchanged. */
function isEngineFinding(finding: Finding, compiledRule: CompiledRule): boolean {
  const { rule } = compiledRule;
  if (
    finding.ruleId !== rule.id ||
    finding.title !== rule.title ||
    finding.area !== rule.area ||
    finding.severity !== rule.severity ||
    typeof finding.outcome !== 'string' ||
    finding.missing === undefined ||
    finding.observed === undefined ||
    finding.params !== compiledRule.findingParams ||
    finding.remediation !== rule.remediation ||
    finding.caution !== rule.caution ||
    finding.reference !== rule.reference ||
    finding.local !== (rule.local ? true : undefined)
  )
    return false;
  const keys = Object.keys(finding);
  let at = FINDING_KEYS.length;
  if (finding.local) at++;
  if (finding.hrn !== undefined) at++;
  if (keys.length !== at) return false;
  for (let i = 0; i < FINDING_KEYS.length; i++) if (keys[i] !== FINDING_KEYS[i]) return false;
  if (finding.local && keys[FINDING_KEYS.length] !== 'local') return false;
  return finding.hrn === undefined || keys[at - 1] === 'hrn';
}

function findingJson(finding: Finding, compiledRule: CompiledRule): string {
  // As JSON.stringify writes an array item that is not an object (undefined as null).
  if (typeof finding !== 'object' || finding === null) return JSON.stringify(finding) ?? 'null';
  if (!isEngineFinding(finding, compiledRule)) return JSON.stringify(finding);
  const { head, tail } = textOf(compiledRule);
  return (
    head +
    ',"outcome":' +
    JSON.stringify(finding.outcome) +
    ',"missing":' +
    JSON.stringify(finding.missing) +
    ',"observed":' +
    JSON.stringify(finding.observed) +
    ',' +
    tail +
    (finding.hrn === undefined ? '}' : ',"hrn":' + JSON.stringify(finding.hrn) + '}')
  );
}

/**
 * The result as JSON.stringify(result) writes it. `compiled` is the version it was scored
 * against: its rules are in the order of the result's findings.
 */
export function resultJson(result: ScoreResult, compiled: CompiledRuleset): string {
  const { findings } = result;
  const rules = compiled.rules;
  if (!Array.isArray(findings) || findings.length !== rules.length) return JSON.stringify(result);
  let out = '{';
  for (const key of Object.keys(result)) {
    const value = (result as unknown as Record<string, unknown>)[key];
    if (value === undefined || typeof value === 'function' || typeof value === 'symbol') continue;
    let written: string;
    if (key === 'findings') {
      written = '[';
      for (let i = 0; i < findings.length; i++)
        written += (i === 0 ? '' : ',') + findingJson(findings[i]!, rules[i]!);
      written += ']';
    } else written = JSON.stringify(value);
    out += (out.length === 1 ? '' : ',') + JSON.stringify(key) + ':' + written;
  }
  return out + '}';
}
