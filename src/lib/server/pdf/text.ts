/**
 * Small formatting helpers for the report: plain text safe for the embedded fonts, dates in
 * the organisation's time zone, measured values in its unit system.
 */
import {
  formatAsEntered,
  formatCanonical,
  type EnteredMeasurement,
  formatLongDate,
  formatLongDateTime,
} from '@/lib/vocabulary';

/** Glyphs Noto Sans' Latin subsets lack, spelled out so nothing prints as a blank box. */
const replacements: Array<[RegExp, string]> = [
  [/≥/g, 'at least '],
  [/≤/g, 'at most '],
  [/≠/g, 'not '],
  [/≈/g, 'about '],
  [/[✓✔]/g, 'yes'],
  [/[✗✘]/g, 'no'],
  [/→/g, '->'],
  [/\u00a0/g, ' '],
];

export function pdfText(value: unknown): string {
  let text = value === null || value === undefined ? '' : String(value);
  for (const [pattern, replacement] of replacements) text = text.replace(pattern, replacement);
  // Control characters (other than newline) have no glyph.
  return text.replace(/[\u0000-\u0009\u000b-\u001f\u007f]/g, '');
}

/** A date in the report: the vocabulary's long date, in the organisation's zone ("-" when none). */
export function formatDate(value: Date | string | null | undefined, timeZone: string): string {
  return value ? formatLongDate(value, timeZone) : '-';
}

/** A moment in the report, to the second, with the zone ("-" when none). */
export function formatDateTime(value: Date | string | null | undefined, timeZone: string): string {
  return value ? formatLongDateTime(value, timeZone) : '-';
}

/**
 * A canonical value (mm, N, kg …) in the organisation's system, with its unit: imperial
 * lengths in feet and inches to 1/16 in, metric in mm to 0.1 mm (see measure-display).
 */
export function formatQuantity(
  value: number,
  unit: string | undefined,
  system: 'imperial' | 'metric',
): string {
  return formatCanonical(value, unit, system);
}

/** `hingeGapMm` -> `hinge gap`; `m.closingEdgeForceN` -> `closing edge force`. */
export function factLabel(key: string): string {
  const last = key.split('.').pop() ?? key;
  const bare = last.replace(/(Mm|N|Kg|Deg|S|Ms|V|A|Pct)$/, '');
  return bare
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .trim();
}

/** The unit a fact key's suffix names, when it names one. */
export function unitFromKey(key: string): string | undefined {
  const last = key.split('.').pop() ?? key;
  const match = /(Mm|N|Kg|Deg|Ms|S|V|A)$/.exec(last);
  if (!match) return undefined;
  return {
    Mm: 'mm',
    N: 'N',
    Kg: 'kg',
    Deg: 'deg',
    Ms: 'ms',
    S: 's',
    V: 'V',
    A: 'A',
  }[match[1]];
}

/**
 * An observed fact for the report: a measurement as the auditor entered it when the fact is one
 * (`m.<question>`), else the canonical value in the organisation's system.
 */
export function formatObserved(
  key: string,
  value: unknown,
  system: 'imperial' | 'metric',
  asEntered: Record<string, EnteredMeasurement> = {},
): string {
  const entered = key.startsWith('m.') ? asEntered[key.slice(2)] : undefined;
  if (entered && typeof value === 'number') return formatAsEntered(entered);
  if (value === null || value === undefined) return 'not recorded';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'number') return formatQuantity(value, unitFromKey(key), system);
  if (typeof value === 'string') return value === 'na' ? 'not applicable' : value.replace(/_/g, ' ');
  if (Array.isArray(value))
    return value.length ? value.map((v) => formatObserved(key, v, system)).join(', ') : 'none';
  return JSON.stringify(value).slice(0, 200);
}
