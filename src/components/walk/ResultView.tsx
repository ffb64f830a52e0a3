/**
 * The result: while walking, the live preview (verdict, area scores, failing findings with
 * their remedy); then Submit, which scores on the server with the pinned version and shows
 * the stored verdict, the failing findings with remediation and what still needs information.
 */
import type { WalkRuleset } from '@/lib/api/walk-through';
import { useState } from 'react';
import type { Finding, ScoreResult } from '@/lib/rules/result-types';
import { count, SEVERITY_LABEL, VERDICT_CLASS, VERDICT_EXPLANATION, VERDICT_LABEL } from '@/lib/vocabulary';
import type { Problem } from '@/lib/api/problem';
import { mergeNeeds } from '@/lib/walk/model';
import ConfirmDialog from '../ConfirmDialog';

const SEVERITY_ORDER = { critical: 0, major: 1, minor: 2 } as const;

function AreaScores({ result, ruleset }: { result: ScoreResult; ruleset: WalkRuleset }) {
  const rows = ruleset.areas.filter(
    (a) => result.areaScores[a.key] !== null && result.areaScores[a.key] !== undefined,
  );
  return (
    <section aria-labelledby="area-scores" className="card">
      <h3 id="area-scores" className="mb-3 text-lg font-bold text-iron-900">
        Scores by hazard area
      </h3>
      <ul className="grid gap-3">
        {rows.map((area) => {
          const value = result.areaScores[area.key] as number;
          const tone = value >= 90 ? 'bg-clear' : value >= 60 ? 'bg-remedy' : 'bg-withdraw';
          return (
            <li key={area.key}>
              <div className="flex justify-between text-sm font-semibold text-iron-900">
                <span>{area.title}</span>
                <span className="tabular-nums">{value} / 100</span>
              </div>
              <div className="mt-1 h-3 overflow-hidden rounded-full bg-iron-100" aria-hidden="true">
                <div className={`h-full rounded-full ${tone}`} style={{ width: `${Math.max(2, value)}%` }} />
              </div>
            </li>
          );
        })}
      </ul>
    </section>
  );
}

function FailingFindings({
  findings,
  areaTitle,
}: {
  findings: Finding[];
  areaTitle: (key: string) => string;
}) {
  const failing = findings
    .filter((f) => f.outcome === 'fail')
    .sort((a, b) => SEVERITY_ORDER[a.severity] - SEVERITY_ORDER[b.severity]);
  return (
    <section aria-labelledby="failing" className="card">
      <h3 id="failing" className="mb-3 text-lg font-bold text-iron-900">
        Failing items ({failing.length})
      </h3>
      {failing.length === 0 ? (
        <p className="text-iron-700">No item fails.</p>
      ) : (
        <ul className="grid gap-3">
          {failing.map((f) => (
            <li
              key={f.ruleId}
              className={`rounded-lg border-l-4 bg-iron-50 p-3 ${f.severity === 'critical' ? 'border-l-withdraw' : f.severity === 'major' ? 'border-l-remedy' : 'border-l-iron-400'}`}
            >
              <p className="text-xs font-semibold uppercase tracking-wide text-iron-600">
                {SEVERITY_LABEL[f.severity]} · {areaTitle(f.area)}
                {f.hrn ? ` · HRN ${f.hrn.value} (${f.hrn.band})` : ''}
              </p>
              <p className="mt-0.5 font-semibold text-iron-900">{f.title}</p>
              <p className="mt-1 text-iron-800">
                <span className="font-semibold">Remedy: </span>
                {f.remediation}
              </p>
              <p className="mt-1 text-xs text-iron-600">
                {f.reference.standard}, {f.reference.clause}
              </p>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function Verdict({ result, live }: { result: ScoreResult; live: boolean }) {
  return (
    <div className={`rounded-xl p-4 ${VERDICT_CLASS[result.verdict]}`}>
      <p className="text-sm font-semibold uppercase tracking-wide opacity-90">
        {live ? 'Live result' : 'Submitted result'}
      </p>
      <p className="text-2xl font-bold" data-verdict={result.verdict}>
        {VERDICT_LABEL[result.verdict]}
      </p>
      <p className="mt-1">{VERDICT_EXPLANATION[result.verdict]}</p>
      <p className="mt-2 text-sm font-semibold">
        {result.counts.fail} failing · {result.counts.pass} passing · {result.counts.needsInfo} waiting for
        information
      </p>
    </div>
  );
}

export interface ResultViewProps {
  ruleset: WalkRuleset;
  result: ScoreResult | undefined;
  submitted: boolean;
  blockers: string[];
  refused: Problem | null;
  stale: boolean;
  online: boolean;
  /** Why Submit is not possible right now, if it is not. */
  submitBlocked: string | null;
  submitting: boolean;
  submitProblem: Problem | null;
  onSubmit(): void;
  onGoToCheck(): void;
  /** The staff report page (PDF, sending for signature), once submitted. */
  reportUrl: string;
}

export function ResultView(props: ResultViewProps) {
  const { ruleset, result, submitted } = props;
  const [confirming, setConfirming] = useState(false);
  const areaTitle = (key: string) => ruleset.areas.find((a) => a.key === key)?.title ?? key;
  const needs = result ? mergeNeeds(result.needsInfo) : [];
  return (
    <div className="grid gap-4">
      {!result && !submitted && (
        <div className="card">
          <h2 className="text-lg font-bold text-iron-900">No live result yet</h2>
          {props.blockers.length > 0 ? (
            <ul className="mt-2 list-disc pl-5 text-iron-800">
              {props.blockers.map((b) => (
                <li key={b}>{b}</li>
              ))}
            </ul>
          ) : props.refused ? (
            <p className="mt-2 text-iron-800">
              {props.refused.detail}{' '}
              {(props.refused.errors ?? []).map((e) => `${e.field}: ${e.message}`).join('; ')}
            </p>
          ) : (
            <p className="mt-2 text-iron-800">
              {props.online
                ? 'Working it out…'
                : 'Offline: the result is worked out on the server once the signal is back.'}
            </p>
          )}
        </div>
      )}
      {submitted && (
        <a className="btn w-full sm:w-fit" href={props.reportUrl}>
          Open the report and send it for signature
        </a>
      )}
      {result && (
        <div className="grid gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] lg:items-start">
          <div className="grid min-w-0 gap-4">
            <Verdict result={result} live={!submitted} />
            {!submitted && props.stale && (
              <p className="text-sm font-semibold text-iron-700">
                {props.online
                  ? 'Updating with your latest answers…'
                  : 'Offline: this is the result before your latest answers.'}
              </p>
            )}
            {needs.length > 0 && (
              <section aria-labelledby="still-needed" className="card border-l-4 border-l-brass-500">
                <h3 id="still-needed" className="text-lg font-bold text-iron-900">
                  Still needs information ({needs.length})
                </h3>
                <ul className="mt-2 list-disc pl-5 text-iron-800">
                  {needs.slice(0, 8).map((n) => (
                    <li key={n.key}>{n.prompt}</li>
                  ))}
                </ul>
                {!submitted && (
                  <button type="button" className="btn-secondary mt-3" onClick={props.onGoToCheck}>
                    Open the list
                  </button>
                )}
              </section>
            )}
            <FailingFindings findings={result.findings} areaTitle={areaTitle} />
          </div>
          <AreaScores result={result} ruleset={ruleset} />
        </div>
      )}
      {!submitted && (
        <section aria-labelledby="submit-title" className="card">
          <h2 id="submit-title" className="text-lg font-bold text-iron-900">
            Submit
          </h2>
          <p className="mt-1 text-iron-700">
            Submitting scores the assessment on the server with {ruleset.title} {ruleset.version} and stores
            the result. Answers cannot be changed afterwards.
          </p>
          {props.submitBlocked && <p className="mt-2 font-semibold text-remedy">{props.submitBlocked}</p>}
          {props.submitProblem && (
            <div role="alert" className="mt-2 rounded-md bg-withdraw/10 px-3 py-2 text-withdraw">
              <p className="font-semibold">
                {props.submitProblem.detail ?? 'The assessment could not be submitted.'}
              </p>
              {(props.submitProblem.errors ?? []).length > 0 && (
                <ul className="mt-1 list-disc pl-5 text-sm">
                  {(props.submitProblem.errors ?? []).map((e) => (
                    <li key={e.field + e.message}>
                      {e.field}: {e.message}
                    </li>
                  ))}
                </ul>
              )}
            </div>
          )}
          <button
            type="button"
            className="btn mt-3 w-full sm:w-auto"
            disabled={Boolean(props.submitBlocked) || props.submitting}
            onClick={() => setConfirming(true)}
          >
            {props.submitting ? 'Submitting…' : 'Submit the assessment'}
          </button>
          <p className="mt-3 text-sm text-iron-700">
            Started by mistake?{' '}
            <a className="inline-flex min-h-11 items-center" href={props.reportUrl}>
              Discard the draft on its page
            </a>
          </p>
          <ConfirmDialog
            open={confirming}
            title="Submit this assessment?"
            confirmLabel="Submit and score"
            cancelLabel="Keep editing"
            onCancel={() => setConfirming(false)}
            onConfirm={() => {
              setConfirming(false);
              props.onSubmit();
            }}
          >
            <p>
              The server scores it with {ruleset.title} {ruleset.version} and stores the result
              {result ? ` (${VERDICT_LABEL[result.verdict].toLowerCase()} so far)` : ''}.
            </p>
            <p>
              After that the answers, measurements and photos cannot be changed; a correction later means
              starting a revision.
            </p>
            {needs.length > 0 && (
              <p className="font-semibold text-remedy">
                {count(needs.length, 'item')} still need information and will be reported as not checked.
              </p>
            )}
          </ConfirmDialog>
        </section>
      )}
    </div>
  );
}
