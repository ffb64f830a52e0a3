import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { STATUS_CODES } from 'node:http';
import {
  domainStatus,
  HttpProblem,
  parseValue,
  problem,
  problemTitle,
  zodFieldErrors,
} from '@/lib/server/http/problem';

describe('problem details', () => {
  it('titles every error status properly: a Gone answer is "Gone", and no status is titled "Error"', async () => {
    expect((await problem(410, 'This signing link has expired.').json()).title).toBe('Gone');
    const statuses = Object.keys(STATUS_CODES)
      .map(Number)
      .filter((status) => status >= 400);
    expect(statuses.length).toBeGreaterThan(30);
    for (const status of statuses) {
      const { title } = await problem(status).json();
      expect(title, `status ${status}`).not.toBe('Error');
      expect(title, `status ${status}`).toMatch(/\w{2}/);
    }
    // Every kind of domain error maps to a status with a title of its own (not the generic phrase).
    for (const [kind, status] of Object.entries(domainStatus))
      expect(problemTitle(status), kind).toMatch(/\w{2}/);
    expect(problemTitle(599)).toBe('HTTP 599');
  });

  it('answers with application/problem+json carrying type, title, status and detail (RFC 9457 section 3.1)', async () => {
    const res = problem(409, 'Someone saved first.', { current: { rowVersion: 3 } });
    expect(res.status).toBe(409);
    expect(res.headers.get('content-type')).toBe('application/problem+json');
    const body = await res.json();
    expect(body).toMatchObject({
      status: 409,
      title: 'Conflict',
      detail: 'Someone saved first.',
      current: { rowVersion: 3 },
    });
    expect(typeof body.type).toBe('string');
  });

  it('names every unknown field on its own, nested ones with their path', () => {
    const schema = z.strictObject({ name: z.string(), site: z.strictObject({ city: z.string() }) });
    const result = schema.safeParse({ name: 'x', status: 1, rowVersion: 2, site: { city: 'y', zip: 'z' } });
    expect(result.success).toBe(false);
    const fields = zodFieldErrors(result.error!)
      .map((e) => e.field)
      .sort();
    expect(fields).toEqual(['rowVersion', 'site.zip', 'status']);
  });

  it('turns an invalid value into a 422 that names the field', () => {
    const schema = z.strictObject({ widthMm: z.number().positive('must be greater than zero') });
    try {
      parseValue(schema, { widthMm: -4 });
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(HttpProblem);
      expect((error as HttpProblem).status).toBe(422);
      expect((error as HttpProblem).extra.errors).toEqual([
        { field: 'widthMm', message: 'must be greater than zero' },
      ]);
    }
  });
});
