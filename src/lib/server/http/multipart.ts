/**
 * Reads a multipart/form-data upload through the bounded body reader (body.ts), so an
 * oversize file is refused while it streams in (413 with the caller's own message) rather
 * than after it has filled memory.
 */
import { readFormBody, type TooLarge } from './body';
import { HttpProblem } from './problem';

/** Room for the form's other fields and boundaries around one file. */
const FORM_OVERHEAD_BYTES = 64 * 1024;

export async function readMultipart(
  request: Request,
  fileLimitBytes: number,
  tooLarge: TooLarge,
): Promise<FormData> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) {
    throw new HttpProblem(415, 'Send the file as multipart/form-data.', {
      errors: [{ field: '', message: 'Content-Type must be multipart/form-data' }],
    });
  }
  return readFormBody(request, fileLimitBytes + FORM_OVERHEAD_BYTES, tooLarge);
}
