/**
 * A row of big tap targets that behave as one radio group (native radios, so arrow keys and
 * screen readers work as expected); the chosen one is dark with a tick, readable in sun.
 */
import type { ReactNode } from 'react';

export interface ChoiceOption {
  value: string;
  label: ReactNode;
}

interface Props {
  name: string;
  labelledBy: string;
  options: readonly ChoiceOption[];
  value: string | undefined;
  disabled?: boolean;
  onChange(value: string): void;
  /** Columns on a phone; long labels stack. */
  columns?: 1 | 2 | 3;
}

const columnClass = { 1: 'grid-cols-1', 2: 'grid-cols-2', 3: 'grid-cols-3' } as const;

export function ChoiceButtons({ name, labelledBy, options, value, disabled, onChange, columns = 3 }: Props) {
  return (
    <div role="radiogroup" aria-labelledby={labelledBy} className={`grid gap-2 ${columnClass[columns]}`}>
      {options.map((option) => {
        const checked = value === option.value;
        return (
          <label
            key={option.value}
            className={`flex min-h-12 cursor-pointer items-center justify-center gap-1.5 rounded-lg border-2 px-2 py-2 text-center text-base font-semibold select-none focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-brass-500 ${
              checked
                ? 'border-iron-900 bg-iron-800 text-white'
                : 'border-iron-200 bg-white text-iron-900 hover:border-iron-400'
            } ${disabled ? 'cursor-not-allowed opacity-60' : ''}`}
          >
            <input
              type="radio"
              className="sr-only"
              name={name}
              value={option.value}
              checked={checked}
              disabled={disabled}
              onChange={() => onChange(option.value)}
            />
            {checked && (
              <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true">
                <path d="M3 8.5l3 3 7-7" fill="none" stroke="currentColor" strokeWidth="2.5" />
              </svg>
            )}
            {option.label}
          </label>
        );
      })}
    </div>
  );
}
