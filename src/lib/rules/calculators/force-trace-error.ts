/**
 * The one error type for force traces, so callers can show a technician why a recording
 * was refused (and on which line of the file) instead of scoring a doubtful measurement.
 */

export type ForceTraceErrorCode =
  | 'empty_trace'
  | 'malformed_line'
  | 'unknown_unit'
  | 'invalid_sample'
  | 'time_not_increasing'
  | 'sample_rate_too_low'
  | 'no_contact'
  | 'too_short'
  | 'zone_unknown'
  | 'gap_not_covered';

/** A force trace or its file was refused; `code` is stable for the UI, `message` is for people. */
export class ForceTraceError extends Error {
  readonly code: ForceTraceErrorCode;
  /** 1-based line of the CSV file, when the problem is on one line. */
  readonly line: number | null;

  constructor(code: ForceTraceErrorCode, message: string, line: number | null = null) {
    super(message);
    this.name = 'ForceTraceError';
    this.code = code;
    this.line = line;
  }
}
