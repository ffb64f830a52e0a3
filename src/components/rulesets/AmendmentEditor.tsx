/**
 * The owner's amendment editor for a draft ruleset version: thresholds, severities and rules on
 * or off, local requirements in or out, the validation problems the server finds (nothing is
 * stored while any remains), the diff against the version the draft came from, and publishing.
 * Every change goes through /api; the draft on the server is always the truth.
 */
import { fieldWords } from '@/lib/vocabulary';
import { useMemo, useState } from 'react';
import type { AmendmentPatch, AmendmentProblem, LocalRule, RulesetVersionDetail } from '@/lib/api/rulesets';
import type { RulesetDiff } from '@/lib/rules/diff';
import type { UnitSystem } from '@/lib/units';
import LocalRuleForm from './LocalRuleForm';
import RuleEditCard, { type BaselineRule, type RuleEdit } from './RuleEditCard';
import RulesetDiffView, { paramUnitsOf } from './RulesetDiffView';
import { amendDraft, deleteDraft, publishDraft, rulesetDiff } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';

interface Props {
  initial: RulesetVersionDetail;
  baseline: Record<string, BaselineRule>;
  initialDiff: RulesetDiff | null;
  system: UnitSystem;
}

/** The rule a problem concerns: its own ruleId, or the id in a `rules.<id>…` field. */
function ruleOf(problem: AmendmentProblem, ruleIds: readonly string[]): string | undefined {
  if (problem.ruleId) return problem.ruleId;
  const match = ruleIds.filter((id) => problem.field === `rules.${id}` || problem.field.startsWith(`rules.${id}.`)).sort((a, b) => b.length - a.length)[0];
  return match;
}

/** The pending edits as a PATCH body, or the typing mistakes that stop it being sent. */
function patchOf(edits: Record<string, RuleEdit>, detail: RulesetVersionDetail): { patch: AmendmentPatch['rules']; problems: AmendmentProblem[] } {
  const rules: NonNullable<AmendmentPatch['rules']> = {};
  const problems: AmendmentProblem[] = [];
  for (const [ruleId, edit] of Object.entries(edits)) {
    const rule = detail.content.rules.find((r) => r.id === ruleId);
    if (!rule) continue;
    const change: NonNullable<AmendmentPatch['rules']>[string] = {};
    if (edit.severity !== undefined && edit.severity !== rule.severity) change.severity = edit.severity;
    if (edit.enabled !== undefined && edit.enabled !== rule.enabled) change.enabled = edit.enabled;
    for (const [name, text] of Object.entries(edit.params ?? {})) {
      const value = Number(text);
      if (text.trim() === '' || !Number.isFinite(value)) {
        problems.push({ field: `rules.${ruleId}.params.${name}`, message: 'enter a number', ruleId });
        continue;
      }
      if (value !== rule.params[name]?.value) change.params = { ...change.params, [name]: value };
    }
    if (Object.keys(change).length > 0) rules[ruleId] = change;
  }
  return { patch: rules, problems };
}

export default function AmendmentEditor({ initial, baseline, initialDiff, system }: Props) {
  const [detail, setDetail] = useState(initial);
  const [edits, setEdits] = useState<Record<string, RuleEdit>>({});
  const [problems, setProblems] = useState<AmendmentProblem[]>([]);
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [diff, setDiff] = useState(initialDiff);
  const [busy, setBusy] = useState(false);
  const [adding, setAdding] = useState(false);
  const [confirming, setConfirming] = useState<'publish' | 'delete' | null>(null);
  const [filter, setFilter] = useState('');

  const { family, version, content } = detail;
  const ruleIds = useMemo(() => content.rules.map((r) => r.id), [content.rules]);
  const pending = patchOf(edits, detail);
  const pendingCount = Object.keys(pending.patch ?? {}).length;
  const problemsByRule = new Map<string, AmendmentProblem[]>();
  const general: AmendmentProblem[] = [];
  for (const p of problems) {
    const ruleId = ruleOf(p, ruleIds);
    if (ruleId && ruleIds.includes(ruleId)) problemsByRule.set(ruleId, [...(problemsByRule.get(ruleId) ?? []), p]);
    else general.push(p);
  }

  const refreshDiff = async (saved: RulesetVersionDetail) => {
    const from = saved.content.derivedFrom;
    if (!from) return;
    const answer = await rulesetDiff(saved.family, { fromFamily: from.family, from: from.version, to: saved.version });
    if (answer.ok) setDiff(answer.value);
  };

  /** Sends a patch; on success the draft, the diff and the edits move on together. */
  const send = async (patch: AmendmentPatch, done: string): Promise<AmendmentProblem[] | null> => {
    setBusy(true);
    setMessage(null);
    const answer = await amendDraft(family, version, patch);
    setBusy(false);
    if (!answer.ok) {
      setProblems(answer.problem.errors);
      setMessage({ tone: 'error', text: `${problemMessage(answer.problem)}${answer.problem.errors.length ? ` (${answer.problem.errors.length} problem${answer.problem.errors.length === 1 ? '' : 's'})` : ''}` });
      return answer.problem.errors;
    }
    setDetail(answer.value);
    setProblems([]);
    await refreshDiff(answer.value);
    setMessage({ tone: 'ok', text: done });
    return null;
  };

  const save = async () => {
    if (pending.problems.length) {
      setProblems(pending.problems);
      setMessage({ tone: 'error', text: 'Some values are not numbers; nothing was sent.' });
      return;
    }
    if (!(await send({ rules: pending.patch }, 'Changes saved to the draft.'))) setEdits({});
  };

  const addRule = async (rule: LocalRule): Promise<AmendmentProblem[] | null> => {
    const problems = await send({ addRules: [rule] }, `“${rule.title}” added to the draft.`);
    if (!problems) {
      setAdding(false);
      return null;
    }
    // Fields of the new rule come back as `addRules[0].…`: hand them to the form without the prefix.
    return problems.map((p) => ({ ...p, field: p.field.replace(/^addRules\[0\]\./, '') }));
  };

  const remove = (ruleId: string) => send({ removeRules: [ruleId] }, 'Local requirement removed.');

  const publish = async () => {
    setBusy(true);
    const answer = await publishDraft(family, version);
    if (answer.ok) {
      window.location.assign(`/rulesets/${family}/${version}`);
      return;
    }
    setBusy(false);
    setConfirming(null);
    setProblems(answer.problem.errors);
    setMessage({ tone: 'error', text: problemMessage(answer.problem) });
  };

  const discard = async () => {
    setBusy(true);
    const answer = await deleteDraft(family, version);
    if (answer.ok) {
      window.location.assign('/rulesets');
      return;
    }
    setBusy(false);
    setConfirming(null);
    setMessage({ tone: 'error', text: problemMessage(answer.problem) });
  };

  const needle = filter.trim().toLowerCase();
  const shown = (r: (typeof content.rules)[number]) => !needle || r.title.toLowerCase().includes(needle) || r.id.includes(needle);
  const areas = content.areas.map((a) => ({ ...a, rules: content.rules.filter((r) => r.area === a.key && shown(r)) })).filter((a) => a.rules.length > 0);
  const local = content.rules.filter((r) => r.local);

  return (
    <div className="grid min-w-0 gap-6 pb-28 [&>*]:min-w-0">
      <div aria-live="polite">
        {message && (
          <p role={message.tone === 'error' ? 'alert' : 'status'} className={`card ${message.tone === 'error' ? 'border-withdraw text-withdraw' : 'border-clear text-clear'}`}>
            {message.text}
          </p>
        )}
        {general.length > 0 && (
          <ul className="card mt-2 grid gap-1 border-withdraw text-sm">
            {general.map((p) => (
              <li key={`${p.field}:${p.message}`}>
                <span className="font-semibold">{fieldWords(p.field)}</span>: {p.message}
              </li>
            ))}
          </ul>
        )}
      </div>

      <section aria-labelledby="local-heading">
        <h2 id="local-heading" className="text-xl font-bold">
          Local requirements ({local.length})
        </h2>
        {local.length === 0 && <p className="text-sm text-iron-600">None yet.</p>}
        <div className="mt-2 grid gap-3">
          {local.map((rule) => (
            <RuleEditCard
              key={rule.id}
              rule={rule}
              edit={edits[rule.id]}
              baseline={undefined}
              problems={problemsByRule.get(rule.id) ?? []}
              system={system}
              busy={busy}
              onChange={(edit) => setEdits({ ...edits, [rule.id]: edit })}
              onRemove={() => remove(rule.id)}
            />
          ))}
          {adding ? (
            <LocalRuleForm content={content} busy={busy} onSubmit={addRule} onCancel={() => setAdding(false)} />
          ) : (
            <button type="button" className="btn-secondary justify-self-start" onClick={() => setAdding(true)} disabled={busy}>
              Add a local requirement
            </button>
          )}
        </div>
      </section>

      <section aria-labelledby="rules-heading">
        <h2 id="rules-heading" className="text-xl font-bold">
          Thresholds, severities and rules in use
        </h2>
        <label className="label mt-2" htmlFor="rule-filter">
          Find a rule
        </label>
        <input id="rule-filter" className="field" type="search" value={filter} onChange={(e) => setFilter(e.target.value)} aria-describedby="rule-filter-hint" />
        <p id="rule-filter-hint" className="mt-1 text-sm text-iron-600">
          A word from its title or its code, for example clearance or placard.
        </p>
        <div className="mt-3 grid gap-3">
          {areas.map((area) => {
            const changedHere = area.rules.filter((r) => edits[r.id] || problemsByRule.has(r.id)).length;
            return (
              <details key={area.key} open={Boolean(needle) || changedHere > 0} className="rounded-xl border border-iron-100 bg-white">
                <summary className="flex min-h-11 cursor-pointer items-center justify-between gap-2 px-4 py-2 font-semibold">
                  <span>{area.title}</span>
                  <span className="text-sm font-normal text-iron-600">
                    {area.rules.length} rules{changedHere > 0 && ` · ${changedHere} to look at`}
                  </span>
                </summary>
                <div className="grid gap-3 p-3 pt-0">
                  {area.rules
                    .filter((r) => !r.local)
                    .map((rule) => (
                      <RuleEditCard
                        key={rule.id}
                        rule={rule}
                        edit={edits[rule.id]}
                        baseline={baseline[rule.id]}
                        problems={problemsByRule.get(rule.id) ?? []}
                        system={system}
                        busy={busy}
                        onChange={(edit) => setEdits({ ...edits, [rule.id]: edit })}
                      />
                    ))}
                </div>
              </details>
            );
          })}
        </div>
      </section>

      {content.derivedFrom && (
        <section aria-labelledby="diff-heading">
          <h2 id="diff-heading" className="text-xl font-bold">
            Changes from version {content.derivedFrom.version}
          </h2>
          <p className="text-sm text-iron-600">What is saved in the draft; unsaved edits are not in it yet.</p>
          {diff ? <RulesetDiffView diff={diff} paramUnits={paramUnitsOf(content.rules)} /> : <p>The comparison is not available.</p>}
        </section>
      )}

      <div className="fixed inset-x-0 bottom-0 z-10 border-t border-iron-200 bg-white/95 px-4 py-2 shadow-lg">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-2">
          {confirming === 'publish' ? (
            <>
              <p className="w-full text-sm font-semibold sm:w-auto">
                Publish {version}? It can never change afterwards{pendingCount > 0 ? '; unsaved changes are left out' : ''}.
              </p>
              <button type="button" className="btn bg-clear" onClick={publish} disabled={busy}>
                Publish now
              </button>
              <button type="button" className="btn-secondary" onClick={() => setConfirming(null)} disabled={busy}>
                Not yet
              </button>
            </>
          ) : confirming === 'delete' ? (
            <>
              <p className="w-full text-sm font-semibold sm:w-auto">Delete this draft and everything in it?</p>
              <button type="button" className="btn bg-withdraw" onClick={discard} disabled={busy}>
                Delete draft
              </button>
              <button type="button" className="btn-secondary" onClick={() => setConfirming(null)} disabled={busy}>
                Keep it
              </button>
            </>
          ) : (
            <div className="grid w-full grid-cols-3 gap-2 sm:flex sm:w-auto">
              <button type="button" className="btn px-2" onClick={save} disabled={busy || (pendingCount === 0 && pending.problems.length === 0)}>
                {pendingCount > 0 ? `Save ${pendingCount}` : 'All saved'}
              </button>
              {pendingCount > 0 ? (
                <button type="button" className="btn-secondary px-2" onClick={() => (setEdits({}), setProblems([]))} disabled={busy}>
                  Undo
                </button>
              ) : (
                <button type="button" className="btn-secondary px-2" onClick={() => setConfirming('publish')} disabled={busy}>
                  Publish…
                </button>
              )}
              <button type="button" className="btn-secondary px-2 text-withdraw" onClick={() => setConfirming('delete')} disabled={busy}>
                Delete…
              </button>
            </div>
          )}
        </div>
      </div>
    </div>
  );
}
