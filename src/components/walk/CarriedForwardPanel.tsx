/**
 * Answers carried forward from the gate's last signed visit, each marked "confirm" until the
 * auditor confirms it as it is here, or changes it in the walk-through (saving it confirms it).
 * Submit is refused while any is left; the list refreshes from the server after each action.
 */
import { useState } from 'react';
import { carriedForward, confirmCarriedForward } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';

export interface CarriedItem {
  /** `answers.<key>` or `measurements.<key>`. */
  key: string;
  prompt: string;
  /** The carried value in words, as entered. */
  shown: string;
}

interface Props {
  assessmentId: string;
  fromVisitedOn: string;
  items: CarriedItem[];
  editable: boolean;
}

export default function CarriedForwardPanel({ assessmentId, fromVisitedOn, items, editable }: Props) {
  const [pending, setPending] = useState(items);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const refresh = async () => {
    const answer = await carriedForward(assessmentId);
    if (!answer.ok) return;
    const keys = answer.value.pending;
    setPending((list) => list.filter((item) => keys.includes(item.key)));
  };

  const confirm = async (keys: string[]) => {
    setBusy(true);
    setMessage(null);
    const answer = await confirmCarriedForward(assessmentId, keys);
    if (!answer.ok && answer.problem.status === 0)
      setMessage(
        'No connection: confirming needs signal. Changing an answer in the walk-through confirms it too.',
      );
    else if (!answer.ok && answer.problem.status !== 422) setMessage(problemMessage(answer.problem));
    await refresh();
    setBusy(false);
  };

  if (pending.length === 0)
    return (
      <p className="card text-sm text-iron-700" role="status" data-carried-forward="done">
        Every answer carried forward from the visit on {fromVisitedOn} is confirmed.
      </p>
    );
  return (
    <section
      className="card border-l-4 border-l-brass-500"
      aria-labelledby="carried-title"
      data-carried-forward
    >
      <h2 id="carried-title" className="text-lg font-bold text-iron-900">
        Carried forward: {pending.length} to confirm
      </h2>
      <p className="mt-1 text-sm text-iron-700">
        These answers come from the signed visit on {fromVisitedOn}. Check each at the gate: confirm it if it
        still holds, or change it in its question. The assessment can be submitted once none is left.
      </p>
      <ul className="mt-3 grid gap-2">
        {pending.map((item) => (
          <li
            key={item.key}
            className="flex flex-wrap items-center justify-between gap-2 rounded-lg border border-iron-100 p-2"
            data-carried-item={item.key}
          >
            <div className="min-w-0 flex-1">
              <span className="mr-2 rounded border border-remedy px-1.5 text-xs font-bold text-remedy">
                Confirm
              </span>
              <a className="font-semibold text-iron-900 underline" href={`#q-${item.key.split('.').pop()}`}>
                {item.prompt}
              </a>
              <span className="block text-sm text-iron-700">Last visit: {item.shown}</span>
            </div>
            {editable && (
              <button
                type="button"
                className="btn-secondary"
                disabled={busy}
                aria-label={`Confirm: ${item.prompt}`}
                onClick={() => void confirm([item.key])}
              >
                Confirm
              </button>
            )}
          </li>
        ))}
      </ul>
      {editable && pending.length > 1 && (
        <button
          type="button"
          className="btn mt-3"
          disabled={busy}
          onClick={() => void confirm(pending.map((item) => item.key))}
        >
          Confirm all {pending.length} as they are
        </button>
      )}
      {message && (
        <p role="alert" className="mt-2 font-semibold text-withdraw">
          {message}
        </p>
      )}
    </section>
  );
}
