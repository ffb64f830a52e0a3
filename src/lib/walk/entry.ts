/**
 * Numbers as a technician types them on site, and the units offered for each kind of
 * measurement. "2-1/4", "2 1/4" and "1/2" are inches as the tape reads; "12,5" is a decimal
 * comma. The canonical value is worked out by the same code the engine uses.
 */
import type { MeasurementValue } from '@/lib/api/walk-through';
import { canonicalValue, type MeasuredAnswerType } from '@/lib/rules/measures';
import type { UnitSystem } from '@/lib/units';

const FRACTION = /^([+-]?\d+)?(?:[\s-]+)?(\d+)\/(\d+)$/;
const DECIMAL = /^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)$/;

/** The number in what was typed, or null when it is not one. */
export function parseEntered(text: string): number | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  if (DECIMAL.test(trimmed)) return Number(trimmed.replace(',', '.'));
  const fraction = FRACTION.exec(trimmed);
  if (fraction) {
    const whole = fraction[1] ? Number(fraction[1]) : 0;
    const denominator = Number(fraction[3]);
    if (denominator === 0) return null;
    const part = Number(fraction[2]) / denominator;
    return whole < 0 || fraction[1]?.startsWith('-') ? whole - part : whole + part;
  }
  return null;
}

/** Imperial units of the kinds that have two systems; the others are metric (or have one unit). */
const IMPERIAL_UNITS: ReadonlySet<string> = new Set(['in', 'ft', 'lbf', 'lb', 'ft/s']);

/**
 * Units offered for a kind, imperial first or metric first by the organisation's system; the
 * first is the default. A question may name its own units (`entryUnits`, e.g. a wire run in feet
 * or metres): those are offered instead, in the same system order.
 */
export function unitsFor(
  kind: MeasuredAnswerType,
  system: UnitSystem,
  entryUnits?: readonly string[],
): string[] {
  if (entryUnits && entryUnits.length > 0) {
    const imperial = entryUnits.filter((u) => IMPERIAL_UNITS.has(u));
    const metric = entryUnits.filter((u) => !IMPERIAL_UNITS.has(u));
    return system === 'imperial' ? [...imperial, ...metric] : [...metric, ...imperial];
  }
  const pairs: Partial<Record<MeasuredAnswerType, [string, string]>> = {
    length: ['in', 'mm'],
    force: ['lbf', 'N'],
    mass: ['lb', 'kg'],
    speed: ['ft/s', 'm/s'],
  };
  const single: Record<MeasuredAnswerType, string> = {
    length: 'mm',
    force: 'N',
    mass: 'kg',
    speed: 'm/s',
    time: 's',
    voltage: 'V',
    current: 'A',
    angle: 'deg',
    count: 'count',
  };
  const pair = pairs[kind];
  if (!pair) return [single[kind]];
  return system === 'imperial' ? pair : [pair[1], pair[0]];
}

/** How a unit is written beside a number ("°" for degrees, nothing for a count). */
export function unitLabel(unit: string): string {
  if (unit === 'deg') return '°';
  if (unit === 'count') return '';
  return unit;
}

/** The measurement to store: as entered, with its canonical value. */
export function toMeasurement(
  kind: MeasuredAnswerType,
  value: number,
  unit: string,
  note?: string,
): MeasurementValue {
  const measured: MeasurementValue = { value, unit, canonical: canonicalValue(kind, value, unit) };
  if (note !== undefined) measured.note = note;
  return measured;
}

/** A short, readable number: up to `decimals` places, trailing zeros dropped. */
export function shortNumber(value: number, decimals = 1): string {
  const scale = 10 ** decimals;
  return String(Math.round(value * scale) / scale);
}

/** A random v4 UUID for a photo or trace, made on the device (works without a secure context). */
export function newClientRef(): string {
  if (typeof crypto !== 'undefined' && typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  bytes[6] = ((bytes[6] as number) & 0x0f) | 0x40;
  bytes[8] = ((bytes[8] as number) & 0x3f) | 0x80;
  const hex = [...bytes].map((b) => b.toString(16).padStart(2, '0')).join('');
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}
