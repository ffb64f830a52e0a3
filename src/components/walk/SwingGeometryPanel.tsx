/**
 * Swing geometry check for a ram operator: the installer's offsets go in, the engine's own
 * geometry calculator works out reach, stroke, leverage and clearance over the whole swing,
 * and the top view shows leaf and operator at closed, half and open. Valid inputs are saved
 * with the assessment, where the rules read them.
 */
import type { WalkGate } from '@/lib/api/walk-through';
import { useEffect, useId, useMemo, useRef, useState } from 'react';
import {
  assessSwingOperatorGeometry,
  OPERATOR_LEAF_MIN_CLEARANCE_MM,
  type SwingOperatorGeometryResult,
} from '@/lib/rules/calculators/swing-geometry';
import { fromMillimetres, type LengthUnit } from '@/lib/units';
import { formatLength } from '@/lib/vocabulary';
import { parseEntered, shortNumber, toMeasurement, unitsFor } from '@/lib/walk/entry';
import type { Json } from '@/lib/walk/merge-patch';
import { ClearanceChart } from './ClearanceChart';
import { useWalkActions } from './context';
import { SwingTopView } from './SwingTopView';

export interface SwingGeometryValue {
  aMm: number;
  bMm: number;
  bracketFromHingeMm: number;
  retractedLengthMm: number;
  strokeMm: number;
  targetOpeningDeg: number;
}

const LENGTH_FIELDS = [
  {
    key: 'aMm',
    label: 'A: hinge to rear pivot, along the gate line',
    hint: 'Measured back along the closed gate line from the hinge axis.',
  },
  {
    key: 'bMm',
    label: 'B: gate line to rear pivot, across',
    hint: 'Measured square from the gate line to the operator’s rear pivot.',
  },
  {
    key: 'bracketFromHingeMm',
    label: 'Gate bracket from the hinge',
    hint: 'Along the leaf, hinge axis to the front pivot.',
  },
  { key: 'retractedLengthMm', label: 'Ram length, fully retracted', hint: 'Pivot to pivot.' },
  { key: 'strokeMm', label: 'Stroke', hint: 'How far the ram extends.' },
] as const;

type LengthKey = (typeof LENGTH_FIELDS)[number]['key'];

interface Props {
  gate: WalkGate;
  value: Json | undefined;
  needed: boolean;
}

function toText(mm: number | undefined, unit: string): string {
  return mm === undefined ? '' : shortNumber(fromMillimetres(Math.abs(mm), unit as LengthUnit), 2);
}

export default function SwingGeometryPanel({ gate, value, needed }: Props) {
  const { sync, units, editable } = useWalkActions();
  const saved = value as unknown as SwingGeometryValue | undefined;
  const lengthUnits = unitsFor('length', units);
  const [unit, setUnit] = useState(lengthUnits[0] as string);
  const [texts, setTexts] = useState<Record<LengthKey, string>>(() => ({
    aMm: toText(saved?.aMm, lengthUnits[0] as string),
    bMm: toText(saved?.bMm, lengthUnits[0] as string),
    bracketFromHingeMm: toText(saved?.bracketFromHingeMm, lengthUnits[0] as string),
    retractedLengthMm: toText(saved?.retractedLengthMm, lengthUnits[0] as string),
    strokeMm: toText(saved?.strokeMm, lengthUnits[0] as string),
  }));
  const [angleText, setAngleText] = useState(saved ? String(saved.targetOpeningDeg) : '90');
  /** B is measured as a distance; its side follows the way the gate opens (away from the operator: negative). */
  const [farSide, setFarSide] = useState(saved ? saved.bMm < 0 : gate.openingDirection === 'push_to_open');
  const ids = useId();

  const input = useMemo((): SwingGeometryValue | string => {
    const mm: Partial<Record<LengthKey, number>> = {};
    for (const field of LENGTH_FIELDS) {
      const n = parseEntered(texts[field.key]);
      if (n === null) return `Enter ${field.label.split(':')[0]?.toLowerCase()}.`;
      mm[field.key] = toMeasurement('length', n, unit).canonical;
    }
    const angle = parseEntered(angleText);
    if (angle === null || angle <= 0 || angle > 180)
      return 'Enter the opening angle wanted, between 1° and 180°.';
    return {
      aMm: mm.aMm as number,
      bMm: (farSide ? -1 : 1) * Math.abs(mm.bMm as number),
      bracketFromHingeMm: mm.bracketFromHingeMm as number,
      retractedLengthMm: mm.retractedLengthMm as number,
      strokeMm: mm.strokeMm as number,
      targetOpeningDeg: angle,
    };
  }, [texts, angleText, unit, farSide]);

  const result = useMemo((): SwingOperatorGeometryResult | string => {
    if (typeof input === 'string') return input;
    try {
      return assessSwingOperatorGeometry(input);
    } catch (error) {
      return error instanceof Error ? `${error.message}.` : 'These figures cannot be laid out.';
    }
  }, [input]);

  // Valid figures are saved with the assessment (once typing pauses).
  const lastSaved = useRef(JSON.stringify(saved ?? null));
  useEffect(() => {
    if (!editable || typeof input === 'string' || typeof result === 'string') return;
    const json = JSON.stringify(input);
    if (json === lastSaved.current) return;
    const timer = setTimeout(() => {
      lastSaved.current = json;
      void sync.edit({ observations: { swingGeometry: input as unknown as Json } });
    }, 500);
    return () => clearTimeout(timer);
  }, [input, result, editable, sync]);

  const reach = typeof result === 'string' ? null : result;
  const leafLengthMm = gate.widthMm ? gate.widthMm / (gate.leaves === 'double' ? 2 : 1) : null;

  return (
    <section
      id="item-geometry"
      tabIndex={-1}
      aria-labelledby="geometry-title"
      className={`card scroll-mt-32 border-l-4 ${needed ? 'border-l-brass-500' : 'border-l-iron-200'}`}
    >
      <h3 id="geometry-title" className="text-lg font-semibold text-iron-900">
        Swing geometry check
      </h3>
      <p className="mt-1 text-sm text-iron-600">
        Where the ram operator is mounted decides how far the gate can open and whether the ram body pinches
        against the leaf.
      </p>
      <fieldset className="mt-3 grid min-w-0 gap-3 sm:grid-cols-2" disabled={!editable}>
        <legend className="sr-only">Operator mounting figures</legend>
        <div className="sm:col-span-2">
          <span className="label" id={`${ids}-unit`}>
            Measured in
          </span>
          <div
            role="radiogroup"
            aria-labelledby={`${ids}-unit`}
            className="flex w-fit overflow-hidden rounded-lg border-2 border-iron-200"
          >
            {lengthUnits.map((u) => (
              <label
                key={u}
                className={`flex min-h-11 min-w-14 cursor-pointer items-center justify-center px-3 font-semibold focus-within:outline-3 focus-within:-outline-offset-3 focus-within:outline-brass-500 ${unit === u ? 'bg-iron-800 text-white' : 'bg-white text-iron-800'}`}
              >
                <input
                  type="radio"
                  className="sr-only"
                  name={`${ids}-unit`}
                  checked={unit === u}
                  onChange={() => {
                    // Keep the lengths: convert what is typed into the new unit.
                    setTexts((current) => {
                      const next = { ...current };
                      for (const field of LENGTH_FIELDS) {
                        const n = parseEntered(current[field.key]);
                        if (n !== null)
                          next[field.key] = shortNumber(
                            fromMillimetres(toMeasurement('length', n, unit).canonical, u as LengthUnit),
                            2,
                          );
                      }
                      return next;
                    });
                    setUnit(u);
                  }}
                />
                {u}
              </label>
            ))}
          </div>
        </div>
        {LENGTH_FIELDS.map((field) => (
          <div key={field.key}>
            <label htmlFor={`${ids}-${field.key}`} className="label">
              {field.label} ({unit})
            </label>
            <input
              id={`${ids}-${field.key}`}
              className="field tabular-nums"
              inputMode="decimal"
              aria-describedby={`${ids}-${field.key}-hint`}
              value={texts[field.key]}
              onChange={(e) => setTexts((current) => ({ ...current, [field.key]: e.target.value }))}
            />
            <p id={`${ids}-${field.key}-hint`} className="mt-1 text-xs text-iron-600">
              {field.hint}
            </p>
          </div>
        ))}
        <div>
          <label htmlFor={`${ids}-angle`} className="label">
            Opening wanted (°)
          </label>
          <input
            id={`${ids}-angle`}
            className="field tabular-nums"
            inputMode="decimal"
            value={angleText}
            onChange={(e) => setAngleText(e.target.value)}
          />
        </div>
        <label className="flex min-h-11 items-center gap-3 font-semibold text-iron-900 sm:col-span-2">
          <input
            type="checkbox"
            className="size-6 accent-iron-800"
            checked={farSide}
            onChange={(e) => setFarSide(e.target.checked)}
          />
          Operator is on the far side (the gate opens away from it)
        </label>
      </fieldset>

      {typeof result === 'string' ? (
        <p className="mt-4 rounded-md bg-iron-50 px-3 py-2 text-iron-800" role="status">
          {result}
        </p>
      ) : (
        <div className="mt-4 grid min-w-0 gap-4 xl:grid-cols-2">
          <SwingTopView input={input as SwingGeometryValue} result={result} leafLengthMm={leafLengthMm} />
          <div>
            <ul className="grid gap-2">
              <li
                className={`rounded-md px-3 py-2 font-semibold ${result.swingReachable ? 'bg-clear/10 text-clear' : 'bg-withdraw/10 text-withdraw'}`}
              >
                {result.swingReachable
                  ? `Reaches the ${(input as SwingGeometryValue).targetOpeningDeg}° opening.`
                  : `Cannot reach ${(input as SwingGeometryValue).targetOpeningDeg}°: reachable ${result.reachableRangesDeg.map((r) => `${r.fromDeg}°–${r.toDeg}°`).join(', ') || 'nowhere'}.`}
              </li>
              <li
                className={`rounded-md px-3 py-2 font-semibold ${result.clearance.pass ? 'bg-clear/10 text-clear' : 'bg-withdraw/10 text-withdraw'}`}
              >
                Closest the ram comes to the leaf: {formatLength(result.minClearanceMm, units)} at{' '}
                {result.minClearanceAtDeg}° (at least {formatLength(OPERATOR_LEAF_MIN_CLEARANCE_MM, units)}{' '}
                wanted).
              </li>
              <li className="rounded-md bg-iron-50 px-3 py-2 text-iron-900">
                Stroke used: {formatLength(result.strokeNeededMm, units)} of{' '}
                {formatLength((input as SwingGeometryValue).strokeMm, units)}; extension{' '}
                {formatLength(result.extensionAtClosedMm, units)} closed,{' '}
                {formatLength(result.extensionAtOpenMm, units)} open.
              </li>
              <li
                className={`rounded-md px-3 py-2 ${result.passesDeadCentre ? 'bg-remedy/10 font-semibold text-remedy' : 'bg-iron-50 text-iron-900'}`}
              >
                {result.passesDeadCentre
                  ? `The ram passes dead centre at ${result.deadCentreDeg}°: no leverage there.`
                  : `Leverage: at least ${formatLength(result.minLeverArmMm, units)} (at ${result.minLeverArmAtDeg}°).`}
              </li>
            </ul>
            <ClearanceChart chart={result.chart} limitMm={OPERATOR_LEAF_MIN_CLEARANCE_MM} units={units} />
          </div>
        </div>
      )}
      {reach && editable && (
        <p className="mt-2 text-sm text-iron-600">These figures are saved with the assessment.</p>
      )}
    </section>
  );
}
