/**
 * Reads the CSV a force meter exports into samples (seconds, newtons). Meters and office
 * spreadsheets differ: comma, semicolon or tab separated; decimal point or decimal comma;
 * time in s or ms; with or without a header line.
 */
import { toNewtons } from '../../units';
import { ForceTraceError } from './force-trace-error';
import type { ForceSample } from './force-trace';

/** What the file itself may not say. */
export interface ForceTraceCsvOptions {
  /** Time unit when the file has no header that says it. Default seconds. */
  timeUnit?: 's' | 'ms';
}

type ForceUnitInFile = 'N' | 'kN' | 'lbf' | 'kgf';

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const DECIMAL_COMMA = /^[+-]?\d*,\d+$/;
const TIME_COLUMN = /^(?:t|time|zeit|temps|tiempo)(?![a-z])/i;
const FORCE_COLUMN = /^(?:f|force|kraft|load)(?![a-z])/i;
const TIME_UNITS: Record<string, 's' | 'ms'> = {
  s: 's',
  sec: 's',
  secs: 's',
  second: 's',
  seconds: 's',
  ms: 'ms',
  msec: 'ms',
  millisecond: 'ms',
  milliseconds: 'ms',
};
const FORCE_UNITS: Record<string, ForceUnitInFile> = { n: 'N', kn: 'kN', lbf: 'lbf', kgf: 'kgf' };

/** Splits one line on the separator, honouring double quotes ("0,005";"12,5"). */
function splitFields(line: string, separator: string): string[] {
  const fields: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < line.length; i += 1) {
    const char = line[i];
    if (char === '"') {
      if (quoted && line[i + 1] === '"') {
        field += '"';
        i += 1;
      } else quoted = !quoted;
    } else if (char === separator && !quoted) {
      fields.push(field.trim());
      field = '';
    } else field += char;
  }
  fields.push(field.trim());
  return fields;
}

function parseNumber(field: string, decimalComma: boolean): number | null {
  const text = decimalComma && DECIMAL_COMMA.test(field) ? field.replace(',', '.') : field;
  return NUMBER.test(text) ? Number(text) : null;
}

/**
 * The unit written in a header cell. A unit in brackets ("time [ms]", "F (N)") must be known;
 * a trailing word ("time_s", "force N") counts only when it is a known unit.
 */
function unitInHeader<U>(cell: string, known: Record<string, U>, kind: string, line: number): U | null {
  const bracketed = /[[(]\s*([a-zA-Z]+)\s*[\])]\s*$/.exec(cell);
  if (bracketed) {
    const unit = known[(bracketed[1] as string).toLowerCase()];
    if (unit === undefined) {
      throw new ForceTraceError('unknown_unit', `Line ${line}: unknown ${kind} unit "${bracketed[1]}"`, line);
    }
    return unit;
  }
  const suffix = /[_\s]([a-zA-Z]+)\s*$/.exec(cell);
  return suffix ? (known[(suffix[1] as string).toLowerCase()] ?? null) : null;
}

function toNewtonsFrom(value: number, unit: ForceUnitInFile): number {
  return unit === 'kN' ? value * 1000 : toNewtons(value, unit);
}

/**
 * Parses a force-meter CSV into samples in seconds and newtons. Without a header a file has
 * exactly two columns, time then force; a header may name them in any order among others. Malformed lines are refused with a
 * `ForceTraceError` naming the line number; order and sampling are checked later by
 * `evaluateForceTrace`.
 */
export function parseForceTraceCsv(text: string, options: ForceTraceCsvOptions = {}): ForceSample[] {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/);
  const content = lines
    .map((raw, index) => ({ raw: raw.trim(), line: index + 1 }))
    .filter(({ raw }) => raw !== '' && !raw.startsWith('#'));
  const first = content[0];
  if (!first) throw new ForceTraceError('empty_trace', 'The file holds no samples');

  const separator = first.raw.includes(';') ? ';' : first.raw.includes('\t') ? '\t' : ',';
  const decimalComma = separator !== ',';
  const firstFields = splitFields(first.raw, separator);
  const hasHeader = firstFields.some((field) => parseNumber(field, decimalComma) === null);

  let timeColumn = 0;
  let forceColumn = 1;
  let timeUnit: 's' | 'ms' = options.timeUnit ?? 's';
  let forceUnit: ForceUnitInFile = 'N';
  if (hasHeader) {
    const named = (pattern: RegExp) => firstFields.findIndex((cell) => pattern.test(cell));
    if (named(TIME_COLUMN) >= 0) timeColumn = named(TIME_COLUMN);
    if (named(FORCE_COLUMN) >= 0) forceColumn = named(FORCE_COLUMN);
    timeUnit = unitInHeader(firstFields[timeColumn] ?? '', TIME_UNITS, 'time', first.line) ?? timeUnit;
    forceUnit = unitInHeader(firstFields[forceColumn] ?? '', FORCE_UNITS, 'force', first.line) ?? 'N';
  }

  const columns = hasHeader ? firstFields.length : 2;
  const samples: ForceSample[] = [];
  for (const { raw, line } of hasHeader ? content.slice(1) : content) {
    const fields = splitFields(raw, separator);
    const t = parseNumber(fields[timeColumn] ?? '', decimalComma);
    const f = parseNumber(fields[forceColumn] ?? '', decimalComma);
    // Every row has as many columns as the header (or, without one, exactly time and force):
    // this is what catches decimal commas in a comma-separated file ("0,005,12,5").
    if (t === null || f === null || fields.length !== columns) {
      throw new ForceTraceError(
        'malformed_line',
        `Line ${line}: expected ${columns} fields separated by "${separator === '\t' ? 'tab' : separator}" with time and force as numbers, found "${raw}"`,
        line,
      );
    }
    samples.push({ t: timeUnit === 'ms' ? t / 1000 : t, f: toNewtonsFrom(f, forceUnit) });
  }
  if (samples.length === 0) throw new ForceTraceError('empty_trace', 'The file holds a header but no samples');
  return samples;
}
