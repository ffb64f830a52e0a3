/**
 * The strip that stays on top while walking: whether the work is on the server (saved,
 * saving, waiting on this phone), the live verdict, and the three views.
 */
import type { Verdict } from '@/lib/rules/vocabulary';
import type { SyncState } from '@/lib/walk/sync';
import { VERDICT_ICON, VERDICT_SHORT, VERDICT_TEXT_CLASS } from '@/lib/vocabulary';

export type WalkView = 'walk' | 'check' | 'result';

function SaveState({ state }: { state: SyncState }) {
  let icon: string;
  let text: string;
  let tone: string;
  if (state.phase === 'conflict') {
    [icon, text, tone] = ['!', 'Needs your decision', 'bg-withdraw text-white'];
  } else if (state.phase === 'closed') {
    [icon, text, tone] = ['✓', 'Submitted', 'bg-iron-700 text-white'];
  } else if (state.phase === 'saving') {
    [icon, text, tone] = ['↻', 'Saving…', 'bg-iron-700 text-white'];
  } else if (state.pendingCount > 0 || state.phase === 'waiting') {
    const n = state.pendingCount;
    [icon, text, tone] = [
      '●',
      `${n} ${n === 1 ? 'change' : 'changes'} on this phone${state.online ? '' : ' · offline'}`,
      'bg-brass-400 text-iron-900',
    ];
  } else if (state.phase === 'loading') {
    [icon, text, tone] = ['…', 'Opening', 'bg-iron-700 text-white'];
  } else {
    [icon, text, tone] = ['✓', state.online ? 'All saved' : 'All saved · offline', 'bg-clear text-white'];
  }
  return (
    <p
      role="status"
      aria-live="polite"
      data-save-state={state.phase}
      className={`inline-flex min-h-9 items-center gap-1.5 rounded-full px-3 text-sm font-semibold ${tone}`}
    >
      <span aria-hidden="true">{icon}</span>
      {text}
    </p>
  );
}

interface Props {
  state: SyncState;
  verdict: Verdict | null;
  stale: boolean;
  toCheck: number;
  view: WalkView;
  onView(view: WalkView): void;
}

export function StatusBar({ state, verdict, stale, toCheck, view, onView }: Props) {
  const tabs: { key: WalkView; label: string; count?: number }[] = [
    { key: 'walk', label: 'Walk' },
    { key: 'check', label: 'To check', count: toCheck },
    { key: 'result', label: 'Result' },
  ];
  return (
    <div className="sticky top-0 z-20 -mx-4 border-b border-iron-200 bg-white/95 px-4 pt-2 shadow-sm backdrop-blur sm:-mx-6 sm:px-6">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <SaveState state={state} />
        {verdict ? (
          // A status that opens the result, drawn as text with an icon so it never reads as an order.
          <button
            type="button"
            onClick={() => onView('result')}
            data-live-verdict={verdict}
            className={`inline-flex min-h-11 items-center gap-1.5 text-sm font-semibold ${VERDICT_TEXT_CLASS[verdict]}`}
          >
            <span
              aria-hidden="true"
              className="inline-flex size-5 items-center justify-center rounded-full border-2 border-current text-xs"
            >
              {VERDICT_ICON[verdict]}
            </span>
            <span>
              <span className="text-iron-700">Verdict so far: </span>
              <span className="underline decoration-current underline-offset-2">
                {VERDICT_SHORT[verdict]}
              </span>
            </span>
            {stale && <span aria-label="(updating)">…</span>}
          </button>
        ) : (
          <span className="text-sm font-semibold text-iron-600">No result yet</span>
        )}
      </div>
      <div role="tablist" aria-label="Walk-through views" className="mt-2 grid grid-cols-3">
        {tabs.map((tab) => (
          <button
            key={tab.key}
            type="button"
            role="tab"
            id={`tab-${tab.key}`}
            aria-selected={view === tab.key}
            aria-controls={`panel-${tab.key}`}
            tabIndex={view === tab.key ? 0 : -1}
            onClick={() => onView(tab.key)}
            onKeyDown={(e) => {
              const i = tabs.findIndex((t) => t.key === view);
              const next =
                e.key === 'ArrowRight'
                  ? tabs[(i + 1) % tabs.length]
                  : e.key === 'ArrowLeft'
                    ? tabs[(i + tabs.length - 1) % tabs.length]
                    : null;
              if (next) {
                e.preventDefault();
                onView(next.key);
                document.getElementById(`tab-${next.key}`)?.focus();
              }
            }}
            className={`flex min-h-12 items-center justify-center gap-1.5 border-b-4 px-1 text-base font-semibold whitespace-nowrap ${view === tab.key ? 'border-brass-500 text-iron-900' : 'border-transparent text-iron-600 hover:text-iron-900'}`}
          >
            {tab.label}
            {tab.count ? (
              <span className="rounded-full bg-brass-100 px-1.5 text-sm tabular-nums text-iron-900">
                <span className="sr-only">, </span>
                {tab.count}
              </span>
            ) : null}
          </button>
        ))}
      </div>
    </div>
  );
}
