/**
 * The organisation's document-signing certificate: made on first use, self-signed, RSA-2048
 * with SHA-256, and kept as a PKCS#12 file under $LATCHWELL_DATA_DIR/certs/<organisation>.p12.
 * A reader that does not trust it still proves the PDF is unaltered since signing; an
 * organisation that wants a trusted signature replaces the file with one from a CA.
 */
import { generateKeyPairSync, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import forge from 'node-forge';
import { dataDir } from '../storage';

export interface OrganisationCertificate {
  p12: Buffer;
  passphrase: string;
  /** Where the .p12 lives. */
  file: string;
  created: boolean;
}

/** Ten years: the signed archive should outlive a short certificate. */
const VALIDITY_YEARS = 10;

const idPattern = /^[0-9a-f-]{36}$/;

export function certificatesDir(): string {
  return path.join(dataDir(), 'certs');
}

/** CERT_PASSPHRASE from env, else one generated once beside the certificates (mode 0600). */
function passphrase(dir: string): string {
  if (process.env.LATCHWELL_CERT_PASSPHRASE) return process.env.LATCHWELL_CERT_PASSPHRASE;
  const file = path.join(dir, 'passphrase');
  writeOnce(file, randomBytes(24).toString('base64url'));
  return fs.readFileSync(file, 'utf8').trim();
}

/** The certificate of `organisation`, created (and kept) when it has none yet. */
export function organisationCertificate(organisation: { id: string; name: string }): OrganisationCertificate {
  if (!idPattern.test(organisation.id)) throw new Error('organisation id must be a UUID');
  const dir = certificatesDir();
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  const secret = passphrase(dir);
  const file = path.join(dir, `${organisation.id}.p12`);
  let created = false;
  if (!fs.existsSync(file)) created = writeOnce(file, makeP12(organisation.name, secret));
  return { p12: fs.readFileSync(file), passphrase: secret, file, created };
}

/**
 * Writes `content` to `file` only if it does not exist yet: temp file, then a hard link that
 * fails when another process got there first (whose file then wins). True when we wrote it.
 */
function writeOnce(file: string, content: string | Buffer): boolean {
  if (fs.existsSync(file)) return false;
  const temp = `${file}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  fs.writeFileSync(temp, content, { mode: 0o600 });
  try {
    fs.linkSync(temp, file);
    return true;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
    return false;
  } finally {
    fs.rmSync(temp, { force: true });
  }
}

function makeP12(organisationName: string, secret: string): Buffer {
  // Node makes the key (fast, native); node-forge builds the X.509 certificate and the PKCS#12.
  const { privateKey, publicKey } = generateKeyPairSync('rsa', {
    modulusLength: 2048,
  });
  const key = forge.pki.privateKeyFromPem(privateKey.export({ type: 'pkcs1', format: 'pem' }).toString());
  const cert = forge.pki.createCertificate();
  cert.publicKey = forge.pki.publicKeyFromPem(publicKey.export({ type: 'spki', format: 'pem' }).toString());
  // RFC 5280 4.1.2.2: a positive serial of at most 20 octets.
  cert.serialNumber = `01${randomBytes(15).toString('hex')}`;
  cert.validity.notBefore = new Date(Date.now() - 60_000);
  cert.validity.notAfter = new Date(cert.validity.notBefore.getTime());
  cert.validity.notAfter.setFullYear(cert.validity.notAfter.getFullYear() + VALIDITY_YEARS);
  const subject = [
    { name: 'commonName', value: `${organisationName.slice(0, 56)} (reports)` },
    { name: 'organizationName', value: organisationName.slice(0, 64) },
    { name: 'organizationalUnitName', value: 'Latchwell document signing' },
  ];
  cert.setSubject(subject);
  cert.setIssuer(subject);
  cert.setExtensions([
    { name: 'basicConstraints', cA: false, critical: true },
    // RFC 5280 4.2.1.3: digitalSignature + nonRepudiation (contentCommitment) for document signing.
    {
      name: 'keyUsage',
      digitalSignature: true,
      nonRepudiation: true,
      critical: true,
    },
    { name: 'subjectKeyIdentifier' },
  ]);
  cert.sign(key, forge.md.sha256.create());
  const asn1 = forge.pkcs12.toPkcs12Asn1(key, [cert], secret, {
    algorithm: '3des',
    friendlyName: organisationName.slice(0, 64),
  });
  return Buffer.from(forge.asn1.toDer(asn1).getBytes(), 'binary');
}
