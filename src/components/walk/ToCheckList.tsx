/**
 * Everything still open, one tap from the item: what the live result is waiting on (with how
 * many rules need it), what must be known before anything can be scored, and the questions
 * not answered yet.
 */
import type { WalkQuestion } from '@/lib/api/walk-through';
import type { NeedsInfoItem } from '@/lib/rules/result-types';
import { mergeNeeds, questionKeyOfFact, toolOfFact } from '@/lib/walk/model';

export interface CheckTarget {
  id: string;
  label: string;
  detail?: string;
}

const TOOL_TARGET: Record<string, string> = {
  site: 'item-site',
  gate: 'item-gate',
  entrapment: 'item-entrapment',
  force: 'item-force',
  geometry: 'item-geometry',
};

/** Where in the walk a missing fact is answered. */
export function targetOfFact(fact: string): string {
  const key = questionKeyOfFact(fact);
  if (key) return `q-${key}`;
  return TOOL_TARGET[toolOfFact(fact) ?? ''] ?? 'item-site';
}

interface Props {
  blockers: string[];
  needsInfo: readonly NeedsInfoItem[];
  unanswered: readonly WalkQuestion[];
  previewAvailable: boolean;
  onGo(targetId: string): void;
}

function Entry({ target, onGo }: { target: CheckTarget; onGo(id: string): void }) {
  return (
    <li>
      <button
        type="button"
        onClick={() => onGo(target.id)}
        className="flex min-h-12 w-full items-center justify-between gap-3 rounded-lg border border-iron-200 bg-white px-3 py-2 text-left hover:border-iron-400"
      >
        <span>
          <span className="block font-semibold text-iron-900">{target.label}</span>
          {target.detail && <span className="block text-sm text-iron-600">{target.detail}</span>}
        </span>
        <span aria-hidden="true" className="text-xl text-iron-600">
          ›
        </span>
      </button>
    </li>
  );
}

export function ToCheckList({ blockers, needsInfo: raw, unanswered, previewAvailable, onGo }: Props) {
  const needsInfo = mergeNeeds(raw);
  const needed = new Set(raw.map((n) => questionKeyOfFact(n.key)).filter(Boolean));
  const rest = unanswered.filter((q) => !needed.has(q.key));
  const nothing = blockers.length === 0 && needsInfo.length === 0 && rest.length === 0;
  return (
    <div className="grid gap-6">
      {nothing && (
        <p className="card text-lg font-semibold text-clear">
          Nothing left to check: every item is answered.
        </p>
      )}
      {blockers.length > 0 && (
        <section aria-labelledby="check-blockers">
          <h2 id="check-blockers" className="mb-2 text-lg font-bold text-iron-900">
            Needed before anything can be scored
          </h2>
          <ul className="grid gap-2">
            {blockers.map((text) => (
              <Entry
                key={text}
                target={{ id: /edit the gate/.test(text) ? 'item-gate' : 'item-site', label: text }}
                onGo={onGo}
              />
            ))}
          </ul>
        </section>
      )}
      {needsInfo.length > 0 && (
        <section aria-labelledby="check-needed">
          <h2 id="check-needed" className="mb-2 text-lg font-bold text-iron-900">
            The result is waiting on these
          </h2>
          <ul className="grid gap-2">
            {needsInfo.map((item) => (
              <Entry
                key={item.key}
                target={{
                  id: targetOfFact(item.key),
                  label: item.prompt,
                  detail: `Needed by ${item.ruleIds.length} ${item.ruleIds.length === 1 ? 'rule' : 'rules'}`,
                }}
                onGo={onGo}
              />
            ))}
          </ul>
        </section>
      )}
      {!previewAvailable && blockers.length === 0 && (
        <p className="text-sm text-iron-600">
          The live result is not available right now, so only unanswered questions are listed.
        </p>
      )}
      {rest.length > 0 && (
        <section aria-labelledby="check-unanswered">
          <h2 id="check-unanswered" className="mb-2 text-lg font-bold text-iron-900">
            Not answered yet ({rest.length})
          </h2>
          <ul className="grid gap-2">
            {rest.map((q) => (
              <Entry key={q.key} target={{ id: `q-${q.key}`, label: q.prompt }} onGo={onGo} />
            ))}
          </ul>
        </section>
      )}
    </div>
  );
}
