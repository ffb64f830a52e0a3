/**
 * Numbers and measurements as people read them: counts with their nouns, file sizes, and
 * stored measurements (mm, N, kg, m/s) in the organisation's unit system.
 *
 * The unit formatters below are the building blocks; how a measurement is shown as entered, as
 * a stored value or as a ruleset limit is in ./measurements.ts.
 */
import {
  fromKilograms,
  fromMetresPerSecond,
  fromNewtons,
  MILLIMETRES_PER_INCH,
  type Measured,
  type UnitSystem,
} from '@/lib/units';

// ---------------------------------------------------------------------------------------------
// Counts and sizes

const pluralRules = new Intl.PluralRules('en-US');

/** A number with thousands separators: "3,500". */
export function formatNumber(n: number, maximumFractionDigits = 2): string {
  return n.toLocaleString('en-US', { maximumFractionDigits });
}

/**
 * "1 attachment", "2 attachments", "0 attachments". Pass the plural when it is not the
 * singular plus "s" (`count(3, 'leaf', 'leaves')`).
 */
export function count(n: number, singular: string, plural = `${singular}s`): string {
  return `${n.toLocaleString('en-US')} ${pluralRules.select(n) === 'one' ? singular : plural}`;
}

/** "in 1 day", "in 348 days", "today", "3 days overdue" for a distance in whole days. */
export function daysFromNow(days: number): string {
  if (days === 0) return 'today';
  return days > 0 ? `in ${count(days, 'day')}` : `${count(-days, 'day')} overdue`;
}

/** "a, b and c". */
export function listOf(items: readonly string[]): string {
  if (items.length <= 1) return items[0] ?? '';
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** A file size: "2.5 MB", "15 MB". */
export function megabytes(bytes: number): string {
  return `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
}

// ---------------------------------------------------------------------------------------------
// Measurements

function finite(value: number, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new RangeError(`${what} must be a finite number`);
  return value;
}

/** Rounds for display and drops trailing zeros ("406", "7.5"). */
function trimmed(value: number, decimals: number): string {
  const scale = 10 ** decimals;
  const rounded = Math.round(Number((value * scale).toPrecision(15))) / scale + 0;
  return String(rounded);
}

/** Inches shown the way the trade writes them: whole plus a reduced fraction, e.g. "2-1/4". */
function inchesWithFraction(inches: number, denominator: number): string {
  const parts = Math.round(Math.abs(inches) * denominator);
  const whole = Math.floor(parts / denominator);
  let numerator = parts % denominator;
  let den = denominator;
  while (numerator > 0 && numerator % 2 === 0 && den % 2 === 0) {
    numerator /= 2;
    den /= 2;
  }
  const sign = inches < 0 && parts > 0 ? '-' : '';
  if (numerator === 0) return `${sign}${whole}`;
  return whole === 0 ? `${sign}${numerator}/${den}` : `${sign}${whole}-${numerator}/${den}`;
}

/** Display options for lengths. */
export interface FormatLengthOptions {
  /** Imperial: smallest fraction of an inch shown (2, 4, 8 or 16). Default 8. */
  fractionDenominator?: 2 | 4 | 8 | 16;
}

/** Lengths of at least 36 in are shown in feet and inches ("6 ft 1-1/2 in"); shorter ones in inches. */
const IMPERIAL_FEET_FROM_INCHES = 36;
/** Metric lengths from 10 m up are shown in metres; shorter ones in millimetres as technicians measure them. */
const METRIC_METRES_FROM_MM = 10_000;

/**
 * Formats a stored length for people: millimetres (0.1 mm, trailing zeros dropped) in metric,
 * fractional inches or feet-and-inches in imperial, as the trade writes them.
 */
export function formatLength(mm: number, system: UnitSystem, options: FormatLengthOptions = {}): string {
  finite(mm, 'Length');
  if (system === 'metric') {
    return Math.abs(mm) >= METRIC_METRES_FROM_MM ? `${trimmed(mm / 1000, 2)} m` : `${trimmed(mm, 1)} mm`;
  }
  const denominator = options.fractionDenominator ?? 8;
  const inches = mm / MILLIMETRES_PER_INCH;
  if (Math.abs(inches) < IMPERIAL_FEET_FROM_INCHES) return `${inchesWithFraction(inches, denominator)} in`;
  const totalParts = Math.round(Math.abs(inches) * denominator);
  const feet = Math.floor(totalParts / (12 * denominator));
  const restInches = (totalParts - feet * 12 * denominator) / denominator;
  const sign = inches < 0 ? '-' : '';
  return restInches === 0
    ? `${sign}${feet} ft`
    : `${sign}${feet} ft ${inchesWithFraction(restInches, denominator)} in`;
}

/** Formats a stored force (N) as newtons or pounds-force, 0.1 precision. */
export function formatForce(newtons: number, system: UnitSystem): string {
  return system === 'metric'
    ? `${trimmed(finite(newtons, 'Force'), 1)} N`
    : `${trimmed(fromNewtons(newtons, 'lbf'), 1)} lbf`;
}

/** Formats a stored mass (kg) as kilograms or pounds, 0.1 precision. */
export function formatMass(kg: number, system: UnitSystem): string {
  return system === 'metric'
    ? `${trimmed(finite(kg, 'Mass'), 1)} kg`
    : `${trimmed(fromKilograms(kg, 'lb'), 1)} lb`;
}

/** Formats a stored speed (m/s) as m/s or ft/s, 0.01 precision. */
export function formatSpeed(metresPerSecond: number, system: UnitSystem): string {
  return system === 'metric'
    ? `${trimmed(finite(metresPerSecond, 'Speed'), 2)} m/s`
    : `${trimmed(fromMetresPerSecond(metresPerSecond, 'ft/s'), 2)} ft/s`;
}

/** Shows a measurement exactly as the technician entered it ("16 in"). */
export function formatMeasured(measured: Measured): string {
  return `${measured.value} ${measured.unit}`;
}
