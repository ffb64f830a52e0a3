/**
 * A newer copy of this assessment was saved elsewhere (another phone, the office) and changed
 * the same items this phone changed. Nothing is overwritten until the auditor picks, item by
 * item, which value stays.
 */
import type { WalkQuestion } from '@/lib/api/walk-through';
import { useEffect, useRef, useState } from 'react';
import type { FieldConflict } from '@/lib/walk/draft';
import type { Json } from '@/lib/walk/merge-patch';
import { YES_NO_NA_LABEL } from '@/lib/vocabulary';

function describe(value: Json | undefined): string {
  if (value === undefined || value === null) return 'Nothing';
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  if (typeof value === 'object' && !Array.isArray(value)) {
    if ('unit' in value && 'value' in value) return `${value.value} ${value.unit}`;
    if ('value' in value) {
      const text = YES_NO_NA_LABEL[value.value as keyof typeof YES_NO_NA_LABEL] ?? String(value.value);
      return value.note ? `${text} (note: ${String(value.note)})` : text;
    }
  }
  if (Array.isArray(value)) return `${value.length} ${value.length === 1 ? 'entry' : 'entries'}`;
  return String(value);
}

function titleOf(field: string[], questions: readonly WalkQuestion[]): string {
  const [doc, key, sub] = field;
  if (doc === 'answers' || doc === 'measurements')
    return questions.find((q) => q.key === key)?.prompt ?? key ?? '';
  if (key === 'site') return `Site: ${sub}`;
  return (
    {
      entrapment: 'Entrapment zones and protection',
      forceTests: 'Force tests',
      swingGeometry: 'Swing geometry',
    }[key ?? ''] ?? field.join('.')
  );
}

interface Props {
  conflicts: FieldConflict[];
  questions: readonly WalkQuestion[];
  onResolve(choices: Map<string, 'mine' | 'theirs'>): void;
}

export function ConflictDialog({ conflicts, questions, onResolve }: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  const [choices, setChoices] = useState(() => new Map<string, 'mine' | 'theirs'>());
  useEffect(() => {
    if (conflicts.length && !dialog.current?.open) dialog.current?.showModal();
  }, [conflicts.length]);
  const complete = conflicts.every((c) => choices.has(c.field.join('.')));
  return (
    <dialog
      ref={dialog}
      aria-labelledby="conflict-title"
      className="m-auto w-[min(100vw-1rem,40rem)] rounded-xl p-0 backdrop:bg-iron-900/60"
      onCancel={(e) => e.preventDefault()}
    >
      <div className="p-4">
        <h2 id="conflict-title" className="text-xl font-bold text-iron-900">
          Saved elsewhere in the meantime
        </h2>
        <p className="mt-1 text-iron-700">
          Someone saved other values for{' '}
          {conflicts.length === 1 ? 'this item' : `these ${conflicts.length} items`} while this phone had
          changes waiting. Choose which value to keep for each.
        </p>
        <ul className="mt-4 grid gap-4">
          {conflicts.map((c) => {
            const id = c.field.join('.');
            return (
              <li key={id}>
                <fieldset className="rounded-lg border border-iron-200 p-3">
                  <legend className="px-1 font-semibold text-iron-900">{titleOf(c.field, questions)}</legend>
                  {(['mine', 'theirs'] as const).map((side) => (
                    <label
                      key={side}
                      className="mt-2 flex min-h-11 cursor-pointer items-center gap-3 rounded-md px-2 hover:bg-iron-50"
                    >
                      <input
                        type="radio"
                        className="size-5 accent-iron-800"
                        name={id}
                        checked={choices.get(id) === side}
                        onChange={() => setChoices((m) => new Map(m).set(id, side))}
                      />
                      <span>
                        <span className="block text-sm text-iron-600">
                          {side === 'mine' ? 'On this phone' : 'Saved elsewhere'}
                        </span>
                        <span className="block font-semibold text-iron-900">
                          {describe(side === 'mine' ? c.mine : c.theirs)}
                        </span>
                      </span>
                    </label>
                  ))}
                </fieldset>
              </li>
            );
          })}
        </ul>
        <button
          type="button"
          className="btn mt-4 w-full"
          disabled={!complete}
          onClick={() => {
            dialog.current?.close();
            onResolve(choices);
          }}
        >
          Keep these values
        </button>
      </div>
    </dialog>
  );
}
