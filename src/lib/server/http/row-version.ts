/**
 * Optimistic concurrency over HTTP: a record's row version travels as a strong ETag
 * (`"7"`), and a change names the version it was made against in `If-Match`. The database
 * update then only wins when the row still has that version, so two devices editing the same
 * draft never silently overwrite each other.
 */
import { HttpProblem } from './problem';

export function etagOf(rowVersion: number): string {
  return `"${rowVersion}"`;
}

/** The row version named by `If-Match`, or undefined when the header is absent. */
export function ifMatchVersion(request: Request): number | undefined {
  const header = request.headers.get('if-match');
  if (header === null) return undefined;
  const match = /^\s*"(\d{1,9})"\s*$/.exec(header);
  if (!match) {
    throw new HttpProblem(400, 'If-Match must be the ETag you read, e.g. "3" (quotes included).', {
      errors: [{ field: 'If-Match', message: 'must be one strong ETag such as "3"' }],
    });
  }
  return Number(match[1]);
}

/** Like `ifMatchVersion`, but a change without `If-Match` is refused with 428. */
export function requireIfMatch(request: Request): number {
  const version = ifMatchVersion(request);
  if (version === undefined) {
    throw new HttpProblem(
      428,
      'Send If-Match with the ETag you read (the row version), so a stale copy cannot overwrite a newer one.',
      {
        errors: [{ field: 'If-Match', message: 'is required' }],
      },
    );
  }
  return version;
}
