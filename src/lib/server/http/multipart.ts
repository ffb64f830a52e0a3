/**
 * Reads a multipart/form-data upload with a byte limit, so an oversize file is refused while
 * it streams in (413 with the caller's own message) rather than after it has filled memory.
 */
import { HttpProblem } from './problem';

/** Room for the form's other fields and boundaries around one file. */
const FORM_OVERHEAD_BYTES = 64 * 1024;

export async function readMultipart(request: Request, fileLimitBytes: number, tooLarge: (bytes: number | null) => HttpProblem): Promise<FormData> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) {
    throw new HttpProblem(415, 'Send the file as multipart/form-data.', { errors: [{ field: '', message: 'Content-Type must be multipart/form-data' }] });
  }
  const limit = fileLimitBytes + FORM_OVERHEAD_BYTES;
  const declared = Number(request.headers.get('content-length') ?? 0);
  if (declared > limit) throw tooLarge(declared - FORM_OVERHEAD_BYTES > fileLimitBytes ? declared : null);
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (request.body) {
    const reader = request.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > limit) {
        await reader.cancel();
        throw tooLarge(null);
      }
      chunks.push(value);
    }
  }
  try {
    return await new Response(Buffer.concat(chunks), { headers: { 'content-type': type } }).formData();
  } catch {
    throw new HttpProblem(400, 'The upload could not be read as a form.', { errors: [{ field: '', message: 'Malformed multipart body' }] });
  }
}
