/**
 * One rule in the amendment editor: in use or not, its severity, and its thresholds (the value
 * only; the unit is the rule's). Shows what the rule was in the version the draft came from,
 * and the sentence it reads as with the values being typed.
 */
import { useId } from 'react';
import type { AmendmentProblem } from '@/lib/api/rulesets';
import type { RulesetRule } from '@/lib/rules/ruleset-schema';
import { SEVERITIES, type Severity } from '@/lib/rules/vocabulary';
import { cautionWithoutDisclaimer, describeCondition, fieldWords, formatParam, keyWords, type ParamLike, SEVERITY_CLASS, SEVERITY_LABEL, gateKindsText } from '@/lib/vocabulary';
import type { UnitSystem } from '@/lib/units';

/** What the owner has changed on this rule and not saved yet; param values as typed. */
export interface RuleEdit {
  severity?: Severity;
  enabled?: boolean;
  params?: Record<string, string>;
}

/** The rule as it was in the version the draft was derived from (absent for a local rule). */
export interface BaselineRule {
  severity: Severity;
  enabled: boolean;
  params: Record<string, ParamLike>;
}

interface Props {
  rule: RulesetRule;
  edit: RuleEdit | undefined;
  baseline: BaselineRule | undefined;
  problems: AmendmentProblem[];
  system: UnitSystem;
  onChange: (edit: RuleEdit) => void;
  onRemove?: () => void;
  busy: boolean;
}

/** The params a condition would see with the typed values (untypable ones keep the saved value). */
function typedParams(rule: RulesetRule, edit: RuleEdit | undefined): Record<string, ParamLike> {
  const out: Record<string, ParamLike> = { ...rule.params };
  for (const [name, text] of Object.entries(edit?.params ?? {})) {
    const number = Number(text);
    if (text.trim() !== '' && Number.isFinite(number)) out[name] = { ...rule.params[name], value: number };
  }
  return out;
}

export default function RuleEditCard({ rule, edit, baseline, problems, system, onChange, onRemove, busy }: Props) {
  const id = useId();
  const severity = edit?.severity ?? rule.severity;
  const enabled = edit?.enabled ?? rule.enabled;
  const params = typedParams(rule, edit);
  const changed = (edit && Object.keys(edit).length > 0) || false;
  const ruleProblems = problems.filter((p) => !p.field.includes('.params.'));
  return (
    <article id={`rule-${rule.id}`} className={`card scroll-mt-4 ${changed ? 'border-brass-500' : ''} ${enabled ? '' : 'bg-iron-50'}`} aria-labelledby={`${id}-title`}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <h4 id={`${id}-title`} className="font-bold">
          {rule.title}
        </h4>
        <div className="flex flex-wrap gap-1 text-xs font-semibold">
          <span className={`rounded px-2 py-0.5 ${SEVERITY_CLASS[severity]}`}>{SEVERITY_LABEL[severity]}</span>
          {rule.local && <span className="rounded bg-brass-400 px-2 py-0.5 text-iron-900">Local</span>}
          {changed && <span className="rounded bg-brass-100 px-2 py-0.5 text-brass-700">Not saved</span>}
        </div>
      </div>
      <p className="mt-1 text-xs text-iron-600">
        {gateKindsText(rule.appliesTo.gateKinds)}
      </p>
      <p className="mt-2 text-sm">
        <span className="font-semibold">Passes when </span>
        {describeCondition(rule.condition, params, system)}
      </p>

      <div className="mt-3 grid gap-3 sm:grid-cols-2">
        <label className="flex min-h-11 cursor-pointer items-center gap-3 rounded-lg border border-iron-200 px-3">
          <input type="checkbox" className="h-6 w-6" checked={enabled} disabled={busy} onChange={(e) => onChange({ ...edit, enabled: e.target.checked })} />
          <span className="font-semibold">{enabled ? 'In use' : 'Turned off'}</span>
          {baseline && baseline.enabled !== enabled && <span className="text-xs text-iron-600">(was {baseline.enabled ? 'in use' : 'off'})</span>}
        </label>
        <div>
          <label className="label" htmlFor={`${id}-severity`}>
            Severity {baseline && baseline.severity !== severity && <span className="font-normal text-iron-600">(was {SEVERITY_LABEL[baseline.severity].toLowerCase()})</span>}
          </label>
          <select id={`${id}-severity`} className="field" value={severity} disabled={busy} onChange={(e) => onChange({ ...edit, severity: e.target.value as Severity })}>
            {SEVERITIES.map((s) => (
              <option key={s} value={s}>
                {SEVERITY_LABEL[s]}
              </option>
            ))}
          </select>
        </div>
        {Object.entries(rule.params).map(([name, param]) => {
          if (typeof param.value !== 'number') {
            return (
              <p key={name} className="text-sm">
                <span className="text-iron-600">{keyWords(name)}:</span> {formatParam(param, system)}
              </p>
            );
          }
          const unit = 'unit' in param ? param.unit : undefined;
          const typed = edit?.params?.[name];
          const error = problems.find((p) => p.field.endsWith(`.params.${name}`) || p.field.includes(`.params.${name}.`));
          const was = baseline?.params[name];
          const value = params[name];
          return (
            <div key={name}>
              <label className="label" htmlFor={`${id}-${name}`}>
                {keyWords(name)}
              </label>
              <div className="flex items-center gap-2">
                <input
                  id={`${id}-${name}`}
                  className={`field ${error ? 'border-withdraw' : ''}`}
                  type="number"
                  inputMode="decimal"
                  step="any"
                  min={0}
                  value={typed ?? String(param.value)}
                  disabled={busy}
                  aria-invalid={error ? true : undefined}
                  aria-describedby={`${id}-${name}-hint`}
                  onChange={(e) => onChange({ ...edit, params: { ...edit?.params, [name]: e.target.value } })}
                />
                <span className="shrink-0 font-semibold">{unit === 'count' ? '' : unit}</span>
              </div>
              <p id={`${id}-${name}-hint`} className="mt-1 text-xs text-iron-600">
                {value && formatParam(value, system)}
                {was && typeof was.value === 'number' && was.value !== value?.value && ` · was ${formatParam(was, system)}`}
              </p>
              {error && (
                <p role="alert" className="mt-1 text-sm text-withdraw">
                  {error.message}
                </p>
              )}
            </div>
          );
        })}
      </div>
      {ruleProblems.map((p) => (
        <p key={`${p.field}:${p.message}`} role="alert" className="mt-2 text-sm text-withdraw">
          <span className="font-semibold">{fieldWords(p.field)}</span>: {p.message}
        </p>
      ))}
      <details className="mt-2 text-sm">
        <summary className="cursor-pointer text-iron-700">Remedy, caution and reference</summary>
        <p className="mt-1">{rule.remediation}</p>
        <p className="mt-1 text-iron-600">Homeowner: {cautionWithoutDisclaimer(rule.caution)}</p>
        <p className="mt-1 text-iron-600">
          {rule.reference.standard}, {rule.reference.clause}
        </p>
      </details>
      {onRemove && (
        <button type="button" className="btn-secondary mt-3 text-withdraw" disabled={busy} onClick={onRemove}>
          Remove this local requirement
        </button>
      )}
    </article>
  );
}
