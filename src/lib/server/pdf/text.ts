/**
 * Small formatting helpers for the report: plain text safe for the embedded fonts, dates in
 * the organisation's time zone, measured values in its unit system.
 */
import { formatLongDate, formatLongDateTime, formatQuantity } from '@/lib/vocabulary';

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

export { formatQuantity };

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

export function formatObserved(key: string, value: unknown, system: 'imperial' | 'metric'): string {
  if (value === null || value === undefined) return 'not recorded';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'number') return formatQuantity(value, unitFromKey(key), system);
  if (typeof value === 'string') return value === 'na' ? 'not applicable' : value.replace(/_/g, ' ');
  if (Array.isArray(value))
    return value.length ? value.map((v) => formatObserved(key, v, system)).join(', ') : 'none';
  return JSON.stringify(value).slice(0, 200);
}
