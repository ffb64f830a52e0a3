/**
 * A measured answer: the number as typed (fractions and decimal commas welcome) and a unit
 * picker defaulting to the organisation's system. Stored as entered plus its canonical value;
 * the other system's figure is shown underneath as a check against a unit slip.
 */
import type { MeasurementValue } from '@/lib/api/walk-through';
import { useEffect, useId, useRef, useState } from 'react';
import {
  formatForce,
  formatLength,
  formatMass,
  formatSpeed,
  formatAsEntered,
  parseFeetAndInches,
} from '@/lib/vocabulary';
import type { MeasuredAnswerType } from '@/lib/rules/measures';
import type { UnitSystem } from '@/lib/units';
import { parseEntered, toMeasurement, unitLabel, unitsFor } from '@/lib/walk/entry';

interface Props {
  kind: MeasuredAnswerType;
  labelledBy: string;
  value: MeasurementValue | undefined;
  units: UnitSystem;
  disabled?: boolean;
  /** Units the question names for itself (a wire run in feet or metres); else the kind's usual pair. */
  entryUnits?: readonly string[];
  onChange(value: MeasurementValue | null): void;
}

function otherSystem(kind: MeasuredAnswerType, canonical: number, unit: string): string | null {
  const metricUnits = ['mm', 'm', 'N', 'kg', 'm/s'];
  const other: UnitSystem = metricUnits.includes(unit) ? 'imperial' : 'metric';
  if (kind === 'length') return formatLength(canonical, other);
  if (kind === 'force') return formatForce(canonical, other);
  if (kind === 'mass') return formatMass(canonical, other);
  if (kind === 'speed') return formatSpeed(canonical, other);
  return null;
}

/** The number in the field: feet with a fraction as the tape reads them (6' 2"), else the number. */
function shownText(value: MeasurementValue): string {
  if (value.unit === 'ft' && !Number.isInteger(value.value)) {
    const shown = formatAsEntered(value); // "6 ft 2 in"
    const match = /^(\d+) ft (.+) in$/.exec(shown);
    if (match) return `${match[1]}' ${match[2]}"`;
  }
  return String(value.value);
}

export function MeasureInput({ kind, labelledBy, value, units, disabled, entryUnits, onChange }: Props) {
  const offered = unitsFor(kind, units, entryUnits);
  const [unit, setUnit] = useState(value?.unit ?? (offered[0] as string));
  // Feet typed as 12' 6" (or "12 ft") are kept in feet: the unit joins the choices shown.
  const options = offered.includes(unit) ? offered : [...offered, unit];
  const [text, setText] = useState(value ? shownText(value) : '');
  const [error, setError] = useState<string | null>(null);
  const editing = useRef(false);
  const inputId = useId();
  const errorId = useId();

  // Another device's value (after a sync or a conflict) replaces what is shown, unless typing.
  useEffect(() => {
    if (editing.current) return;
    setText(value ? shownText(value) : '');
    if (value) setUnit(value.unit);
  }, [value]);

  /** Saves what parses; `report` (on leaving the field) also says what does not. */
  const commit = (nextText: string, nextUnit: string, report = false) => {
    if (nextText.trim() === '') {
      setError(null);
      if (value) onChange(null);
      return;
    }
    const feetAndInches = kind === 'length' ? parseFeetAndInches(nextText) : null;
    if (feetAndInches) {
      setError(null);
      setUnit(feetAndInches.unit);
      if (value && value.value === feetAndInches.value && value.unit === feetAndInches.unit) return;
      onChange(toMeasurement(kind, feetAndInches.value, feetAndInches.unit, value?.note));
      return;
    }
    const number = parseEntered(nextText);
    if (number === null || number < 0) {
      if (report)
        setError(
          number === null
            ? `Type a number, e.g. 12.5 or 2-1/4${kind === 'length' ? `, or feet and inches: 6' 2"` : ''}`
            : 'A measurement cannot be negative',
        );
      return;
    }
    setError(null);
    if (value && value.value === number && value.unit === nextUnit) return;
    onChange(toMeasurement(kind, number, nextUnit, value?.note));
  };

  const check = value && value.unit === unit ? otherSystem(kind, value.canonical, value.unit) : null;
  return (
    <div>
      <div className="flex items-stretch gap-2">
        <input
          id={inputId}
          className="field min-w-0 flex-1 max-w-40 text-lg font-semibold tabular-nums"
          inputMode="decimal"
          autoComplete="off"
          enterKeyHint="done"
          aria-labelledby={`${labelledBy} ${inputId}-unit`}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? errorId : undefined}
          value={text}
          disabled={disabled}
          onFocus={() => (editing.current = true)}
          onChange={(e) => {
            setText(e.target.value);
            commit(e.target.value, unit);
          }}
          onBlur={() => {
            editing.current = false;
            commit(text, unit, true);
          }}
        />
        {options.length > 1 ? (
          <div
            role="radiogroup"
            aria-label="Unit"
            id={`${inputId}-unit`}
            className="flex shrink-0 overflow-hidden rounded-lg border-2 border-iron-200"
          >
            {options.map((option) => (
              <label
                key={option}
                className={`flex min-h-11 ${options.length > 2 ? 'min-w-11 px-2' : 'min-w-14 px-3'} cursor-pointer items-center justify-center font-semibold focus-within:outline-3 focus-within:-outline-offset-3 focus-within:outline-brass-500 ${
                  unit === option ? 'bg-iron-800 text-white' : 'bg-white text-iron-800'
                }`}
              >
                <input
                  type="radio"
                  className="sr-only"
                  name={`${inputId}-unit`}
                  value={option}
                  checked={unit === option}
                  disabled={disabled}
                  onChange={() => {
                    setUnit(option);
                    commit(text, option);
                  }}
                />
                {unitLabel(option) || 'count'}
              </label>
            ))}
          </div>
        ) : (
          <span id={`${inputId}-unit`} className="flex items-center px-1 font-semibold text-iron-700">
            {unitLabel(unit)}
          </span>
        )}
      </div>
      {error ? (
        <p id={errorId} className="mt-1 text-sm font-semibold text-withdraw">
          {error}
        </p>
      ) : (
        check && <p className="mt-1 text-sm text-iron-600">= {check}</p>
      )}
    </div>
  );
}
