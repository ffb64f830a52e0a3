/**
 * Measurements for people: a value as the technician entered it ("12 ft 6 in", "2-1/4 in",
 * "406 mm"), a stored value or a ruleset limit in the organisation's system with the trade's
 * rounding, and feet-and-inches as typed on site ("12' 6\"", "12 ft 6 in"). Pure; the PDF,
 * the pages and the islands share it, through the vocabulary's index.
 */
import { MILLIMETRES_PER_INCH, type UnitSystem } from '@/lib/units';
import { formatForce, formatLength, formatMass, formatSpeed } from './numbers';

/** A stored measurement: as entered, with its canonical value (mm, N, kg, m/s). */
export interface EnteredMeasurement {
  value: number;
  unit: string;
  canonical?: number;
}

function trimmedNumber(value: number, decimals: number): string {
  const scale = 10 ** decimals;
  return String(Math.round(Number((value * scale).toPrecision(15))) / scale + 0);
}

/** Inches as the tape reads them, to the 1/16 in: "2-1/4". */
function tapeInches(inches: number): string {
  const sixteenths = Math.round(inches * 16);
  const whole = Math.floor(sixteenths / 16);
  let numerator = sixteenths % 16;
  let denominator = 16;
  while (numerator > 0 && numerator % 2 === 0) {
    numerator /= 2;
    denominator /= 2;
  }
  if (numerator === 0) return String(whole);
  return whole === 0 ? `${numerator}/${denominator}` : `${whole}-${numerator}/${denominator}`;
}

/**
 * A measurement exactly as entered: its own number and unit, never converted. Feet with a
 * fraction read as feet and inches ("12.5 ft" -> "12 ft 6 in"), inches as the tape reads them.
 */
export function formatAsEntered(measured: EnteredMeasurement): string {
  const { value, unit } = measured;
  if (unit === 'ft' && !Number.isInteger(value) && value > 0) {
    const feet = Math.floor(value);
    const inches = (value - feet) * 12;
    const inchText = tapeInches(inches);
    if (inchText === '12') return `${feet + 1} ft`;
    return inchText === '0' ? `${feet} ft` : `${feet} ft ${inchText} in`;
  }
  if (unit === 'in' && !Number.isInteger(value) && value > 0) {
    const exact = Math.abs(value * 16 - Math.round(value * 16)) < 1e-9;
    return exact ? `${tapeInches(value)} in` : `${trimmedNumber(value, 2)} in`;
  }
  if (unit === 'deg') return `${trimmedNumber(value, 1)}°`;
  if (unit === 'count' || unit === '') return trimmedNumber(value, 2);
  return `${trimmedNumber(value, 2)} ${unit}`;
}

/** Width by height as entered, e.g. "12 ft × 6 ft". */
export function formatSize(width: EnteredMeasurement | null, height: EnteredMeasurement | null): string {
  return [width, height]
    .filter((m): m is EnteredMeasurement => Boolean(m))
    .map(formatAsEntered)
    .join(' × ');
}

/** Lengths shown in mm are rounded to this many decimals for a metric reader (0.1 mm). */
const METRIC_LENGTH_DECIMALS = 1;

/**
 * A canonical value (mm, N, kg, m/s, or a unit that has no other system) in the organisation's
 * system: imperial lengths in inches, or feet and inches from 3 ft, to 1/16 in; metric lengths
 * in mm to 0.1 mm (metres from 10 m).
 */
export function formatCanonical(value: number, unit: string | undefined, system: UnitSystem): string {
  if (!Number.isFinite(value)) return String(value);
  switch (unit) {
    case 'mm':
      return system === 'imperial'
        ? formatLength(value, 'imperial', { fractionDenominator: 16 })
        : formatLength(Number(value.toFixed(METRIC_LENGTH_DECIMALS)), 'metric');
    case 'N':
      return formatForce(value, system);
    case 'kg':
      return formatMass(value, system);
    case 'm/s':
      return formatSpeed(value, system);
    case 'deg':
      return `${trimmedNumber(value, 1)}°`;
    case '%':
      return `${trimmedNumber(value, 1)} %`;
    case undefined:
    case 'count':
      return trimmedNumber(value, 2);
    default:
      return `${trimmedNumber(value, 2)} ${unit}`;
  }
}

/**
 * A ruleset limit for the organisation's reader: in its system, "about" when the imperial figure
 * is rounded (a limit written in mm rarely falls on a 1/16 in). UL 325's 1828.8 mm reads "6 ft".
 */
export function formatLimit(value: number, unit: string | undefined, system: UnitSystem): string {
  const shown = formatCanonical(value, unit, system);
  if (system !== 'imperial') return shown;
  const sixteenths = unit === 'mm' ? (value / MILLIMETRES_PER_INCH) * 16 : null;
  const exact = sixteenths === null || Math.abs(sixteenths - Math.round(sixteenths)) < 1e-6;
  return unit === 'mm' && !exact ? `about ${shown}` : shown;
}

const FEET_AND_INCHES =
  /^(?:(\d+(?:[.,]\d+)?)\s*(?:ft|feet|foot|'|’|′))?\s*(?:(\d+(?:[.,]\d+)?|\d+[\s-]+\d+\/\d+|\d+\/\d+)\s*(?:in|inch|inches|"|”|″))?$/i;

function inchNumber(text: string): number {
  const fraction = /^(?:(\d+)[\s-]+)?(\d+)\/(\d+)$/.exec(text);
  if (fraction) {
    const denominator = Number(fraction[3]);
    return denominator === 0 ? NaN : Number(fraction[1] ?? 0) + Number(fraction[2]) / denominator;
  }
  return Number(text.replace(',', '.'));
}

/**
 * A length typed with its units: "12'", "12 ft", "12' 6\"", "12 ft 6-1/2 in", "6 in", "6\"".
 * Feet (with or without inches) come back in feet, inches alone in inches; null when the text
 * names no unit this way (a bare number keeps the unit chosen beside the field).
 */
export function parseFeetAndInches(text: string): { value: number; unit: 'ft' | 'in' } | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  const match = FEET_AND_INCHES.exec(trimmed);
  if (!match || (match[1] === undefined && match[2] === undefined)) return null;
  const feet = match[1] === undefined ? null : Number(match[1].replace(',', '.'));
  const inches = match[2] === undefined ? null : inchNumber(match[2]);
  if (inches !== null && (!Number.isFinite(inches) || (feet !== null && inches >= 12))) return null;
  if (feet === null) return { value: inches as number, unit: 'in' };
  return { value: Number((feet + (inches ?? 0) / 12).toFixed(6)), unit: 'ft' };
}
