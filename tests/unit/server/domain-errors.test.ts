/**
 * Domain code throws the errors of src/lib/server/errors.ts and knows nothing of HTTP; the
 * edge (src/lib/server/http/, routes, pages) maps them in one place. The first test reads the
 * sources, so the next module cannot slip back to throwing HttpProblem; the rest pin the
 * mapping of each kind to its status, title, members and headers.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  ConflictError,
  CorruptRecordError,
  ForbiddenError,
  GoneError,
  InvalidInputError,
  InvalidQueryError,
  NotFoundError,
  RateLimitedError,
  SignInRequiredError,
  TooLargeError,
  UnsupportedTypeError,
  type DomainError,
} from '@/lib/server/errors';
import { domainProblem, handle, HttpProblem, pageErrorOf } from '@/lib/server/http/problem';
import { formErrors } from '@/lib/server/page-form';
import { linkProblem } from '@/lib/server/signing/links';
import { tooLargeProblem } from '@/lib/server/photos/process';

const serverDir = path.resolve(__dirname, '../../../src/lib/server');
const httpDir = path.join(serverDir, 'http');

function domainSources(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return full === httpDir ? [] : domainSources(full);
    return /\.(ts|tsx|mjs|js)$/.test(entry.name) ? [full] : [];
  });
}

/** A line of code (not a comment) that names HttpProblem: an import, a throw, a type, a subclass. */
const namesHttpProblem = /\bHttpProblem\b/;
const commentLine = /^\s*(\/\/|\*|\/\*)/;

describe('where HttpProblem may be used', () => {
  it('no module under src/lib/server outside http/ imports, throws or extends HttpProblem', () => {
    const offenders = domainSources(serverDir).flatMap((file) =>
      fs
        .readFileSync(file, 'utf8')
        .split('\n')
        .map((line, i) => ({ line, at: `${path.relative(serverDir, file)}:${i + 1}` }))
        .filter(({ line }) => namesHttpProblem.test(line) && !commentLine.test(line))
        .map(({ at, line }) => `${at}: ${line.trim()}`),
    );
    expect(offenders).toEqual([]);
  });

  it('the scan reads nested domain folders and skips only http/', () => {
    const files = domainSources(serverDir).map((f) => path.relative(serverDir, f));
    expect(files).toContain('signing/links.ts');
    expect(files).toContain('photos/process.ts');
    expect(files).toContain('auth/password-change.ts');
    expect(files.some((f) => f.startsWith('http/'))).toBe(false);
  });
});

async function answer(error: DomainError) {
  const res = domainProblem(error);
  return { status: res.status, headers: res.headers, body: await res.json() };
}

describe('each domain error as an RFC 9457 problem', () => {
  it.each([
    [new NotFoundError('That assessment'), 404, 'Not found', 'That assessment was not found.'],
    [new ConflictError('Someone saved first.'), 409, 'Conflict', 'Someone saved first.'],
    [
      InvalidInputError.field('siteId', 'no such site'),
      422,
      'Invalid input',
      'Some fields are missing or invalid.',
    ],
    [
      new InvalidQueryError('Some query parameters are invalid.', []),
      400,
      'Bad request',
      'Some query parameters are invalid.',
    ],
    [
      new ForbiddenError('Only staff sign in with a password.'),
      403,
      'Not allowed',
      'Only staff sign in with a password.',
    ],
    [new SignInRequiredError('Sign in to use this.'), 401, 'Sign-in required', 'Sign in to use this.'],
    [
      new TooLargeError('The drawn signature image is too large.'),
      413,
      'Request too large',
      'The drawn signature image is too large.',
    ],
    [
      new UnsupportedTypeError('That file is a PDF file.'),
      415,
      'Unsupported media type',
      'That file is a PDF file.',
    ],
    [
      new RateLimitedError('Too many wrong passwords.', 90),
      429,
      'Too many requests',
      'Too many wrong passwords.',
    ],
    [new GoneError('This signing link has expired.'), 410, 'Gone', 'This signing link has expired.'],
  ] as const)('%s answers %i', async (error, status, title, detail) => {
    const { status: answered, headers, body } = await answer(error);
    expect(answered).toBe(status);
    expect(headers.get('content-type')).toBe('application/problem+json');
    expect(body).toMatchObject({
      type: `https://latchwell.invalid/problems/${status}`,
      title,
      status,
      detail,
    });
  });

  it('a rate limit says when to try again in Retry-After and nowhere in the body', async () => {
    const { headers, body } = await answer(new RateLimitedError('Too many wrong passwords.', 90));
    expect(headers.get('retry-after')).toBe('90');
    expect(Object.keys(body).sort()).toEqual(['detail', 'status', 'title', 'type']);
  });

  it('a conflict caused by one field names it in errors', async () => {
    const { body } = await answer(
      new ConflictError('Someone with this e-mail address already has an account.', {}, [
        { field: 'email', message: 'already has an account' },
      ]),
    );
    expect(body.errors).toEqual([{ field: 'email', message: 'already has an account' }]);
  });

  it("a photo over the limit names the field and the limit in bytes, as the upload route's 413 did", async () => {
    const { status, body } = await answer(tooLargeProblem(16 * 1024 * 1024));
    expect(status).toBe(413);
    expect(body).toEqual({
      type: 'https://latchwell.invalid/problems/413',
      title: 'Request too large',
      status: 413,
      detail:
        'This photo is 16 MB; the limit is 15 MB. Take it again at a lower resolution, or pick a smaller copy.',
      errors: [{ field: 'photo', message: 'must be at most 15 MB' }],
      limitBytes: 15 * 1024 * 1024,
    });
  });

  it.each([
    ['unknown', 404],
    ['used', 409],
    ['expired', 410],
    ['revoked', 410],
  ] as const)('a signing link that is %s answers %i with its linkState', async (state, status) => {
    const { status: answered, body } = await answer(linkProblem(state));
    expect(answered).toBe(status);
    expect(body.linkState).toBe(state);
  });

  it('a corrupt record is a plain 500 that keeps its reason out of the answer', async () => {
    const errors: unknown[] = [];
    const original = console.error;
    console.error = (...args: unknown[]) => errors.push(args);
    try {
      const { status, body } = await answer(
        new CorruptRecordError('This record cannot be read.', 'bad json'),
      );
      expect(status).toBe(500);
      expect(JSON.stringify(body)).not.toContain('bad json');
    } finally {
      console.error = original;
    }
    expect(JSON.stringify(errors)).toContain('bad json');
  });

  it('handle() answers a thrown domain error with its problem and headers', async () => {
    const route = handle(async () => {
      throw new RateLimitedError('Too many wrong passwords.', 30);
    });
    const res = await route({});
    expect(res.status).toBe(429);
    expect(res.headers.get('retry-after')).toBe('30');
  });
});

describe('what a page shows for an error', () => {
  const fields = { currentPassword: { id: 'currentPassword', label: 'Current password' } };

  it('puts a field message beside its field and in the summary, linked to the field', () => {
    const view = pageErrorOf(
      new InvalidInputError('The current password is not right.', [
        { field: 'currentPassword', message: 'is not right' },
      ]),
    );
    const shown = formErrors(view, fields);
    expect(shown.status).toBe(422);
    expect(shown.message).toBe('The current password is not right.');
    expect(shown.byField).toEqual({ currentPassword: 'Current password is not right.' });
    expect(shown.items).toEqual([{ text: 'Current password is not right.', target: 'currentPassword' }]);
  });

  it('heads the summary with what was not done when its lines name fields, else with the error', () => {
    const wrong = new InvalidInputError('The current password is not right.', [
      { field: 'currentPassword', message: 'is not right' },
    ]);
    expect(formErrors(pageErrorOf(wrong), fields, 'The password was not changed.').message).toBe(
      'The password was not changed.',
    );
    const throttled = new RateLimitedError('Too many wrong passwords. Try again in 5 minutes.', 300);
    expect(formErrors(pageErrorOf(throttled), fields, 'The password was not changed.').message).toBe(
      'Too many wrong passwords. Try again in 5 minutes.',
    );
  });

  it('shows a message for a field the form does not have as a summary line without a link', () => {
    const shown = formErrors(
      pageErrorOf(new ConflictError('Not saved.', {}, [{ field: 'other', message: 'is taken' }])),
      fields,
    );
    expect(shown.byField).toEqual({});
    expect(shown.items).toEqual([{ text: 'is taken.', target: null }]);
  });

  it('reads an HttpProblem from an edge helper the same way, and rethrows anything else', () => {
    const view = pageErrorOf(
      new HttpProblem(413, 'Too large.', { errors: [{ field: 'certificate', message: 'is too large' }] }),
    );
    expect(view).toMatchObject({ status: 413, errors: [{ field: 'certificate', message: 'is too large' }] });
    const bug = new TypeError('x is undefined');
    expect(() => pageErrorOf(bug)).toThrow(bug);
  });
});
