/**
 * Uploaded PKCS#12 files are refused unopened when any key derivation in them asks for more
 * iterations than the server will spend on the event loop. Files are made by the OpenSSL command
 * line (Debian's `openssl`), an implementation independent of the node-forge code that reads them.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import forge from 'node-forge';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InvalidInputError } from '@/lib/server/errors';
import { checkPkcs12, largestIterationCount } from '@/lib/server/signing-certificates';

let dir: string;
const passphrase = 'test-pass-1';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'p12-'));
  execFileSync(
    'openssl',
    [
      'req',
      '-x509',
      '-newkey',
      'rsa:2048',
      '-nodes',
      '-days',
      '30',
      '-subj',
      '/CN=Test Signer',
      '-keyout',
      join(dir, 'key.pem'),
      '-out',
      join(dir, 'cert.pem'),
    ],
    { stdio: 'ignore' },
  );
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** `openssl pkcs12 -export` with the given extra options (OpenSSL 3: `-iter` sets the key and certificate PBKDF2 and MAC counts, `-nomaciter` makes the MAC's 1). */
function pkcs12(name: string, ...options: string[]): Buffer {
  const out = join(dir, `${name}.p12`);
  execFileSync(
    'openssl',
    [
      'pkcs12',
      '-export',
      '-inkey',
      join(dir, 'key.pem'),
      '-in',
      join(dir, 'cert.pem'),
      '-passout',
      `pass:${passphrase}`,
      '-out',
      out,
      ...options,
    ],
    { stdio: 'ignore' },
  );
  return readFileSync(out);
}

const asn1Of = (bytes: Buffer) => forge.asn1.fromDer(forge.util.createBuffer(bytes.toString('binary')));

function problemOf(call: () => unknown): InvalidInputError {
  try {
    call();
  } catch (error) {
    if (error instanceof InvalidInputError) return error;
    throw error;
  }
  throw new Error('expected the upload to be refused');
}

describe('iteration counts in an uploaded PKCS#12', () => {
  it('reads the count OpenSSL wrote, from the MAC and from the encrypted key and certificates', () => {
    // OpenSSL pkcs12(1): -iter sets the encryption iteration count; its default is 2048.
    expect(largestIterationCount(asn1Of(pkcs12('default')))).toBe(2048);
    expect(largestIterationCount(asn1Of(pkcs12('iter-5000', '-iter', '5000')))).toBe(5000);
    // The MAC at 1 iteration: the largest count is the key's, found inside the encapsulated contents.
    expect(largestIterationCount(asn1Of(pkcs12('key-only', '-iter', '7000', '-nomaciter')))).toBe(7000);
  });

  it('opens a file at the limit and refuses one over it, even when its MAC uses one iteration', () => {
    // Limit inclusive: 100,000 iterations is accepted; common practice, no source (tools use 2,048 to 100,000).
    const atLimit = pkcs12('at-limit', '-iter', '100000', '-nomaciter');
    expect(largestIterationCount(asn1Of(atLimit))).toBe(100_000);
    expect(checkPkcs12(atLimit, passphrase).cert.subject.getField('CN').value).toBe('Test Signer');

    const over = pkcs12('over-limit', '-iter', '100001', '-nomaciter');
    const refused = problemOf(() => checkPkcs12(over, passphrase));
    expect(refused.kind).toBe('invalid_input');
    expect(refused.errors).toEqual([expect.objectContaining({ field: 'certificate' })]);
    expect(refused.errors[0]?.message).toMatch(/100000 key-derivation iterations/);
  }, 60_000);
});
