/**
 * Reads the CSV a force meter exports into samples (seconds, newtons). Meters and office
 * spreadsheets differ: comma, semicolon or tab separated; decimal point or decimal comma;
 * time in s or ms; with or without a header line.
 */
import Papa from 'papaparse';
import { toNewtons } from '../../units';
import { ForceTraceError } from './force-trace-error';
import type { ForceSample } from './force-trace';

/** What the file itself may not say. */
export interface ForceTraceCsvOptions {
  /** Time unit when the file has no header that says it. Default seconds. */
  timeUnit?: 's' | 'ms';
}

type ForceUnitInFile = 'N' | 'kN' | 'lbf' | 'kgf';

/**
 * The units a file without a header is read in (time, force). The upload form says so, so a
 * meter set to pounds-force is not read as newtons unnoticed: such a file needs a header.
 */
export const HEADERLESS_TRACE_UNITS = { time: 's', force: 'N' } as const;

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

interface Row {
  fields: string[];
  /** The row as written, for error messages. */
  raw: string;
  /** 1-based line number where the row starts. */
  line: number;
}

/**
 * Splits the text into rows with papaparse (chosen over csv-parse for its smaller browser build,
 * as this also runs on the phone; double quotes honoured: "0,005";"12,5"), fields
 * trimmed, each with the line it starts on. Blank lines and lines starting with # are skipped.
 */
function readRows(text: string, separator: string): Row[] {
  const rows: Row[] = [];
  let start = 0;
  let line = 1;
  Papa.parse<string[]>(text, {
    delimiter: separator,
    newline: '\n',
    quoteChar: '"',
    escapeChar: '"',
    step(result) {
      const end = result.meta.cursor;
      const raw = text.slice(start, end).trim();
      const fields = result.data.map((field) => field.trim());
      if (raw !== '' && !raw.startsWith('#')) rows.push({ fields, raw, line });
      for (let i = start; i < end; i += 1) if (text[i] === '\n') line += 1;
      start = end;
    },
  });
  return rows;
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
  const normalised = text.replace(/^\uFEFF/, '').replace(/\r\n|\r/g, '\n');
  // The separator is read off the first line that holds data: a semicolon or tab wins over a comma.
  const firstLine = normalised.split('\n').find((raw) => raw.trim() !== '' && !raw.trim().startsWith('#'));
  if (firstLine === undefined) throw new ForceTraceError('empty_trace', 'The file holds no samples');
  const separator = firstLine.includes(';') ? ';' : firstLine.includes('\t') ? '\t' : ',';
  const decimalComma = separator !== ',';
  const content = readRows(normalised, separator);
  const first = content[0];
  if (!first) throw new ForceTraceError('empty_trace', 'The file holds no samples');
  const firstFields = first.fields;
  const hasHeader = firstFields.some((field) => parseNumber(field, decimalComma) === null);

  let timeColumn = 0;
  let forceColumn = 1;
  let timeUnit: 's' | 'ms' = options.timeUnit ?? HEADERLESS_TRACE_UNITS.time;
  let forceUnit: ForceUnitInFile = HEADERLESS_TRACE_UNITS.force;
  if (hasHeader) {
    const named = (pattern: RegExp) => firstFields.findIndex((cell) => pattern.test(cell));
    if (named(TIME_COLUMN) >= 0) timeColumn = named(TIME_COLUMN);
    if (named(FORCE_COLUMN) >= 0) forceColumn = named(FORCE_COLUMN);
    timeUnit = unitInHeader(firstFields[timeColumn] ?? '', TIME_UNITS, 'time', first.line) ?? timeUnit;
    forceUnit = unitInHeader(firstFields[forceColumn] ?? '', FORCE_UNITS, 'force', first.line) ?? 'N';
  }

  const columns = hasHeader ? firstFields.length : 2;
  const samples: ForceSample[] = [];
  for (const { fields, raw, line } of hasHeader ? content.slice(1) : content) {
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
  if (samples.length === 0)
    throw new ForceTraceError('empty_trace', 'The file holds a header but no samples');
  return samples;
}
