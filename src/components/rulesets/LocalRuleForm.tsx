/**
 * Adds a local requirement to a draft: a rule of a local code or of the authority having
 * jurisdiction, with its own reference, judged by a new question the walk-through will ask
 * (answered yes, or a measurement at least / at most a limit). Checked with the API's own
 * schema before it is sent; the server's problems come back beside each field.
 */
import { useEffect, useId, useRef, useState, type ReactNode } from 'react';
import { LocalRuleSchema, type AmendmentProblem, type LocalRule } from '@/lib/api/rulesets';
import { CANONICAL_UNIT_OF, MEASURED_ANSWER_TYPES, type MeasuredAnswerType } from '@/lib/rules/measures';
import type { RulesetVersion } from '@/lib/rules/ruleset-schema';
import { GATE_KINDS, SEVERITIES, type GateKind } from '@/lib/rules/vocabulary';
import { fieldWords, GATE_KIND_LABEL, SEVERITY_LABEL } from '@/lib/vocabulary';

interface Props {
  content: RulesetVersion;
  busy: boolean;
  /** Sends the rule; answers the problems (fields relative to the rule) or null when it was added. */
  onSubmit: (rule: LocalRule) => Promise<AmendmentProblem[] | null>;
  onCancel: () => void;
}

type CheckKind = 'answer_yes' | 'at_least' | 'at_most';

const MEASURE_LABEL: Record<MeasuredAnswerType, string> = {
  length: 'Length',
  force: 'Force',
  mass: 'Mass',
  speed: 'Speed',
  time: 'Time',
  voltage: 'Voltage',
  current: 'Current',
  angle: 'Angle',
  count: 'Count',
};

export default function LocalRuleForm({ content, busy, onSubmit, onCancel }: Props) {
  const id = useId();
  const [title, setTitle] = useState('');
  const [area, setArea] = useState(content.areas[0]?.key ?? 'controls');
  const [severity, setSeverity] = useState<string>('major');
  const [gateKinds, setGateKinds] = useState<GateKind[]>(['swing', 'slide']);
  const [kind, setKind] = useState<CheckKind>('answer_yes');
  const [prompt, setPrompt] = useState('');
  const [whyItMatters, setWhy] = useState('');
  const [section, setSection] = useState(content.sections[0]?.key ?? 'controls');
  const [measure, setMeasure] = useState<MeasuredAnswerType>('length');
  const [limit, setLimit] = useState('');
  const [harm, setHarm] = useState(content.hrn.dph[Math.floor(content.hrn.dph.length / 2)]?.key ?? '');
  const [remediation, setRemediation] = useState('');
  const [caution, setCaution] = useState('');
  const [standard, setStandard] = useState('');
  const [clause, setClause] = useState('');
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<AmendmentProblem[]>([]);
  const formRef = useRef<HTMLFormElement>(null);
  // Take the owner to the first problem: on a phone the button they pressed is far below it.
  useEffect(() => {
    if (errors.length === 0) return;
    const first = formRef.current?.querySelector('[role=alert]');
    const field = first?.parentElement?.querySelector<HTMLElement>('input, select, textarea');
    (field ?? (first as HTMLElement | null))?.focus();
    first?.scrollIntoView({ block: 'center' });
  }, [errors]);

  const question = { section, prompt, whyItMatters };
  const body = {
    title,
    area,
    severity,
    gateKinds,
    check: kind === 'answer_yes' ? { kind, question } : { kind, question: { ...question, measure }, limit: limit.trim() === '' ? Number.NaN : Number(limit) },
    harm,
    remediation,
    caution,
    reference: { standard, clause, ...(note.trim() ? { note } : {}) },
  };

  const errorOf = (field: string) => errors.find((e) => e.field === field || e.field.startsWith(`${field}.`))?.message;
  const submit = async (event: React.FormEvent) => {
    event.preventDefault();
    const parsed = LocalRuleSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(parsed.error.issues.map((i) => ({ field: i.path.map(String).join('.'), message: i.message })));
      return;
    }
    setErrors([]);
    const problems = await onSubmit(parsed.data);
    if (problems) setErrors(problems);
  };
  const unplaced = errors.filter((e) => !FIELDS.some((f) => e.field === f || e.field.startsWith(`${f}.`)));

  return (
    <form ref={formRef} onSubmit={submit} noValidate className="card grid gap-4 border-brass-400" aria-labelledby={`${id}-heading`}>
      <h3 id={`${id}-heading`} className="text-lg font-bold">
        Add a local requirement
      </h3>
      <p className="text-sm text-iron-600">A requirement of your local code or of the authority having jurisdiction. The walk-through will ask its question at every gate it applies to.</p>
      <Field id={`${id}-title`} label="Title" error={errorOf('title')}>
        <input id={`${id}-title`} className="field" value={title} maxLength={160} onChange={(e) => setTitle(e.target.value)} aria-describedby={`${id}-title-hint`} />
        <p id={`${id}-title-hint`} className="mt-1 text-sm text-iron-600">
          For example “Fire service key switch at the gate”.
        </p>
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field id={`${id}-area`} label="Hazard area" error={errorOf('area')}>
          <select id={`${id}-area`} className="field" value={area} onChange={(e) => setArea(e.target.value as typeof area)}>
            {content.areas.map((a) => (
              <option key={a.key} value={a.key}>
                {a.title}
              </option>
            ))}
          </select>
        </Field>
        <Field id={`${id}-severity`} label="Severity" error={errorOf('severity')}>
          <select id={`${id}-severity`} className="field" value={severity} onChange={(e) => setSeverity(e.target.value)}>
            {SEVERITIES.map((s) => (
              <option key={s} value={s}>
                {SEVERITY_LABEL[s]}
              </option>
            ))}
          </select>
        </Field>
      </div>
      <fieldset>
        <legend className="label">Gate kinds it applies to</legend>
        <div className="grid grid-cols-2 gap-2 sm:grid-cols-3">
          {GATE_KINDS.map((k) => (
            <label key={k} className="flex min-h-11 items-center gap-2 rounded-lg border border-iron-200 px-3">
              <input type="checkbox" className="h-5 w-5" checked={gateKinds.includes(k)} onChange={(e) => setGateKinds(e.target.checked ? [...gateKinds, k] : gateKinds.filter((g) => g !== k))} />
              {GATE_KIND_LABEL[k]}
            </label>
          ))}
        </div>
        {errorOf('gateKinds') && <p className="mt-1 text-sm text-withdraw">{errorOf('gateKinds')}</p>}
      </fieldset>
      <fieldset>
        <legend className="label">How it is judged</legend>
        <div className="grid gap-2">
          {(
            [
              ['answer_yes', 'The auditor answers yes to a question'],
              ['at_least', 'A measurement is at least a limit'],
              ['at_most', 'A measurement is at most a limit'],
            ] as const
          ).map(([value, label]) => (
            <label key={value} className="flex min-h-11 items-center gap-2 rounded-lg border border-iron-200 px-3">
              <input type="radio" name={`${id}-kind`} className="h-5 w-5" checked={kind === value} onChange={() => setKind(value)} />
              {label}
            </label>
          ))}
        </div>
      </fieldset>
      <Field id={`${id}-prompt`} label="The question the auditor is asked" error={errorOf('check.question.prompt')}>
        <input id={`${id}-prompt`} className="field" value={prompt} maxLength={300} onChange={(e) => setPrompt(e.target.value)} />
      </Field>
      <Field id={`${id}-why`} label="Why it matters (shown beside the question)" error={errorOf('check.question.whyItMatters')}>
        <input id={`${id}-why`} className="field" value={whyItMatters} maxLength={400} onChange={(e) => setWhy(e.target.value)} />
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field id={`${id}-section`} label="Asked in the walk-through section" error={errorOf('check.question.section')}>
          <select id={`${id}-section`} className="field" value={section} onChange={(e) => setSection(e.target.value as typeof section)}>
            {content.sections.map((s) => (
              <option key={s.key} value={s.key}>
                {s.title}
              </option>
            ))}
          </select>
        </Field>
        {kind !== 'answer_yes' && (
          <>
            <Field id={`${id}-measure`} label="What is measured" error={errorOf('check.question.measure')}>
              <select id={`${id}-measure`} className="field" value={measure} onChange={(e) => setMeasure(e.target.value as MeasuredAnswerType)}>
                {MEASURED_ANSWER_TYPES.map((m) => (
                  <option key={m} value={m}>
                    {MEASURE_LABEL[m]} ({CANONICAL_UNIT_OF[m]})
                  </option>
                ))}
              </select>
            </Field>
            <Field id={`${id}-limit`} label={`Limit, in ${CANONICAL_UNIT_OF[measure]}`} error={errorOf('check.limit')}>
              <input id={`${id}-limit`} className="field" type="number" inputMode="decimal" step="any" min={0} value={limit} onChange={(e) => setLimit(e.target.value)} />
            </Field>
          </>
        )}
      </div>
      <Field id={`${id}-harm`} label="Worst credible injury (for the hazard rating)" error={errorOf('harm')}>
        <select id={`${id}-harm`} className="field" value={harm} onChange={(e) => setHarm(e.target.value)}>
          {content.hrn.dph.map((d) => (
            <option key={d.key} value={d.key}>
              {d.label}
            </option>
          ))}
        </select>
      </Field>
      <Field id={`${id}-remediation`} label="Remedy" error={errorOf('remediation')}>
        <textarea id={`${id}-remediation`} className="field" rows={2} maxLength={600} value={remediation} onChange={(e) => setRemediation(e.target.value)} />
      </Field>
      <Field id={`${id}-caution`} label="Caution shown to the homeowner" error={errorOf('caution')}>
        <textarea id={`${id}-caution`} className="field" rows={2} maxLength={600} value={caution} onChange={(e) => setCaution(e.target.value)} />
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field id={`${id}-standard`} label="Local code or authority" error={errorOf('reference.standard')}>
          <input id={`${id}-standard`} className="field" value={standard} maxLength={200} onChange={(e) => setStandard(e.target.value)} aria-describedby={`${id}-standard-hint`} />
          <p id={`${id}-standard-hint`} className="mt-1 text-sm text-iron-600">
            For example the county fire code.
          </p>
        </Field>
        <Field id={`${id}-clause`} label="Section or clause" error={errorOf('reference.clause')}>
          <input id={`${id}-clause`} className="field" value={clause} maxLength={200} onChange={(e) => setClause(e.target.value)} />
        </Field>
      </div>
      <Field id={`${id}-note`} label="Note on the reference (optional)" error={errorOf('reference.note')}>
        <input id={`${id}-note`} className="field" value={note} maxLength={300} onChange={(e) => setNote(e.target.value)} />
      </Field>
      {unplaced.map((e) => (
        <p key={`${e.field}:${e.message}`} role="alert" className="text-sm text-withdraw">
          <span className="font-semibold">{fieldWords(e.field)}</span>: {e.message}
        </p>
      ))}
      <div className="flex flex-wrap gap-2">
        <button className="btn" disabled={busy}>
          Add to the draft
        </button>
        <button type="button" className="btn-secondary" onClick={onCancel} disabled={busy}>
          Cancel
        </button>
      </div>
    </form>
  );
}

const FIELDS = ['title', 'area', 'severity', 'gateKinds', 'check.question.prompt', 'check.question.whyItMatters', 'check.question.section', 'check.question.measure', 'check.limit', 'harm', 'remediation', 'caution', 'reference.standard', 'reference.clause', 'reference.note'];

function Field({ id, label, error, children }: { id: string; label: string; error?: string; children: ReactNode }) {
  return (
    <div>
      <label className="label" htmlFor={id}>
        {label}
      </label>
      {children}
      {error && (
        <p role="alert" className="mt-1 text-sm text-withdraw">
          {error}
        </p>
      )}
    </div>
  );
}
