/** The live result at a glance, beside the questions on a wide screen: verdict, counts, area scores. */
import type { WalkRuleset } from '@/lib/api/walk-through';
import type { ScoreResult } from '@/lib/rules/result-types';
import { VERDICT_EXPLANATION, VERDICT_ICON, VERDICT_LABEL, VERDICT_TEXT_CLASS } from '@/lib/vocabulary';

interface Props {
  result: ScoreResult | undefined;
  ruleset: WalkRuleset;
  stale: boolean;
  toCheck: number;
  blockers: number;
  onOpen(view: 'check' | 'result'): void;
}

export function LiveSummary({ result, ruleset, stale, toCheck, blockers, onOpen }: Props) {
  return (
    <section aria-labelledby="live-summary" className="card grid gap-3">
      <h2 id="live-summary" className="text-sm font-semibold uppercase tracking-wide text-iron-600">
        Live result{stale ? ' · updating' : ''}
      </h2>
      {result ? (
        <>
          <div className={`border-l-4 border-current pl-3 ${VERDICT_TEXT_CLASS[result.verdict]}`}>
            <p className="flex items-center gap-2 text-lg font-bold">
              <span aria-hidden="true">{VERDICT_ICON[result.verdict]}</span>
              {VERDICT_LABEL[result.verdict]}
            </p>
            <p className="text-sm text-iron-800">{VERDICT_EXPLANATION[result.verdict]}</p>
          </div>
          <p className="text-sm font-semibold text-iron-800">
            {result.counts.fail} failing · {result.counts.pass} passing · {result.counts.needsInfo} waiting
          </p>
          <ul className="grid gap-1.5">
            {ruleset.areas
              .filter((a) => typeof result.areaScores[a.key] === 'number')
              .map((area) => {
                const value = result.areaScores[area.key] as number;
                return (
                  <li key={area.key} className="grid grid-cols-[1fr_auto] items-center gap-x-2 text-sm">
                    <span className="truncate text-iron-800">{area.title}</span>
                    <span className="font-semibold tabular-nums text-iron-900">{value}</span>
                    <span
                      className="col-span-2 h-1.5 overflow-hidden rounded-full bg-iron-100"
                      aria-hidden="true"
                    >
                      <span
                        className={`block h-full ${value >= 90 ? 'bg-clear' : value >= 60 ? 'bg-remedy' : 'bg-withdraw'}`}
                        style={{ width: `${Math.max(2, value)}%` }}
                      />
                    </span>
                  </li>
                );
              })}
          </ul>
        </>
      ) : (
        <p className="text-iron-700">
          {blockers ? 'Answer the gate and site questions to see a result.' : 'Working it out…'}
        </p>
      )}
      <div className="grid gap-2">
        <button type="button" className="btn-secondary" onClick={() => onOpen('check')}>
          To check ({toCheck})
        </button>
        <button type="button" className="btn" onClick={() => onOpen('result')}>
          Result and submit
        </button>
      </div>
    </section>
  );
}
