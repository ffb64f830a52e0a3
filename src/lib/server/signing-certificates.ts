/**
 * Which certificate signs an organisation's reports: one the owner uploaded (a PKCS#12 with its
 * passphrase, typically issued by a certificate authority so PDF readers can name the signer),
 * or else the self-made one of pdf/organisation-certificate.ts.
 *
 * An upload is checked before anything is kept: it must be PKCS#12, the passphrase must open
 * it, it must hold an RSA private key (at least 2048 bits) with the certificate of that key,
 * the certificate must be valid now and its key usage (when it has one) must allow digital
 * signatures. A test signature of a one-page PDF proves the whole way works.
 *
 * What is stored: the key and its certificate chain re-wrapped into a new PKCS#12 (AES-256)
 * under a fresh random passphrase, and that passphrase sealed with AES-256-GCM under a key
 * derived from AUTH_SECRET (HKDF-SHA256, a random salt per upload, the organisation id as
 * associated data). The passphrase the owner typed is never kept. Reading the database alone
 * does not give the key; changing AUTH_SECRET makes the stored certificate unusable (reports
 * are then signed with the self-made certificate again until the owner uploads it anew).
 */
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import forge from 'node-forge';
import { PDFDocument } from 'pdf-lib';
import { recordAudit } from './audit';
import { authSecret } from './auth/settings';
import { db } from './db';
import { InvalidInputError } from './errors';
import { iso } from './listing';
import { factsOf, type CertificateFacts } from './pdf/certificate-facts';
import { signPdfWithCertificate } from './pdf/digital-signature';
import { organisationCertificate } from './pdf/organisation-certificate';
import type { Actor } from './users';

/** A PKCS#12 with a key and a short chain is a few KB; anything far larger is not one. */
export const MAX_CERTIFICATE_BYTES = 64 * 1024;
const MAX_PASSPHRASE_CHARS = 1024;
const MIN_RSA_BITS = 2048;
/**
 * Common tools use 2,048 to 100,000 (MAC, key and certificate encryption alike); forge spends
 * about a second per 100,000 on the event loop, so more is refused. Inclusive limit.
 */
const MAX_KDF_ITERATIONS = 100_000;

export interface SigningCertificateStatus extends CertificateFacts {
  source: 'uploaded' | 'generated';
  uploadedAt: string | null;
  uploadedBy: string | null;
}

export interface CertificateOverview {
  /** The certificate the next report will be signed with. */
  inUse: SigningCertificateStatus;
  /** The owner's upload when it is not in use (expired, or unreadable after an AUTH_SECRET change), with why. */
  unusable: (SigningCertificateStatus & { reason: string }) | null;
}

export interface SigningCertificate {
  p12: Buffer;
  passphrase: string;
  facts: SigningCertificateStatus;
}

interface StoredRow {
  organisation_id: string;
  p12: Buffer;
  passphrase_sealed: string;
  sha256: string;
  subject: string;
  issuer: string;
  self_signed: boolean;
  not_before: Date;
  not_after: Date;
  uploaded_at: Date;
  uploaded_by_label: string | null;
}

// --- sealing the passphrase -----------------------------------------------------------------

const SEAL_VERSION = 'v1';
const SEAL_INFO = 'latchwell signing-certificate passphrase v1';

function sealingKey(salt: Buffer): Buffer {
  return Buffer.from(hkdfSync('sha256', authSecret(), salt, SEAL_INFO, 32));
}

export function sealPassphrase(organisationId: string, passphrase: string): string {
  const salt = randomBytes(16);
  const iv = randomBytes(12);
  const cipher = createCipheriv('aes-256-gcm', sealingKey(salt), iv);
  cipher.setAAD(Buffer.from(organisationId));
  const sealed = Buffer.concat([cipher.update(passphrase, 'utf8'), cipher.final()]);
  return [SEAL_VERSION, salt, iv, cipher.getAuthTag(), sealed]
    .map((p) => (typeof p === 'string' ? p : p.toString('base64url')))
    .join('.');
}

/** The passphrase, or null when it cannot be opened (another AUTH_SECRET, or a row moved between organisations). */
export function unsealPassphrase(organisationId: string, sealed: string): string | null {
  const [version, salt, iv, tag, data] = sealed.split('.');
  if (version !== SEAL_VERSION || !salt || !iv || !tag || data === undefined) return null;
  try {
    const decipher = createDecipheriv(
      'aes-256-gcm',
      sealingKey(Buffer.from(salt, 'base64url')),
      Buffer.from(iv, 'base64url'),
    );
    decipher.setAAD(Buffer.from(organisationId));
    decipher.setAuthTag(Buffer.from(tag, 'base64url'));
    return Buffer.concat([decipher.update(Buffer.from(data, 'base64url')), decipher.final()]).toString(
      'utf8',
    );
  } catch {
    return null;
  }
}

// --- reading an upload ----------------------------------------------------------------------

function invalid(field: 'certificate' | 'passphrase', message: string): InvalidInputError {
  return new InvalidInputError('The certificate cannot be used.', [{ field, message }]);
}

const dateOnly = (d: Date) => d.toISOString().slice(0, 10);

export interface CheckedCertificate {
  key: forge.pki.rsa.PrivateKey;
  cert: forge.pki.Certificate;
  chain: forge.pki.Certificate[];
}

/**
 * The largest iteration count anywhere in a PKCS#12, nested contents included: the MAC's
 * (MacData: mac, macSalt, iterations), each PKCS#12 PBE parameter set (salt, iterations) and each
 * PBKDF2 parameter set (salt, iterationCount, …) of RFC 7292 / RFC 8018. All three are a SEQUENCE
 * in which an INTEGER follows an OCTET STRING. Encapsulated contents (authSafe, SafeContents)
 * sit in OCTET STRINGs and are parsed as DER where they parse. A count too long to read is
 * Infinity.
 */
export function largestIterationCount(root: forge.asn1.Asn1): number {
  const { Class, Type } = forge.asn1;
  let largest = 0;
  let visited = 0;
  const visit = (node: forge.asn1.Asn1, depth: number): void => {
    if (depth > 24 || ++visited > 20_000) {
      largest = Infinity;
      return;
    }
    if (typeof node.value === 'string') {
      if (
        node.tagClass === Class.UNIVERSAL &&
        node.type === Type.OCTETSTRING &&
        node.value.charCodeAt(0) === 0x30
      ) {
        let inner: forge.asn1.Asn1 | null = null;
        try {
          inner = forge.asn1.fromDer(forge.util.createBuffer(node.value), true);
        } catch {
          inner = null; // a salt or digest that merely starts like a SEQUENCE
        }
        if (inner) visit(inner, depth + 1);
      }
      return;
    }
    const children = node.value as forge.asn1.Asn1[];
    for (let i = 0; i < children.length; i++) {
      const child = children[i]!;
      const before = children[i - 1];
      if (
        node.type === Type.SEQUENCE &&
        child.tagClass === Class.UNIVERSAL &&
        child.type === Type.INTEGER &&
        before?.tagClass === Class.UNIVERSAL &&
        before.type === Type.OCTETSTRING &&
        typeof child.value === 'string'
      ) {
        const count = child.value.length > 4 ? Infinity : forge.asn1.derToInteger(child.value);
        if (count > largest) largest = count;
      }
      visit(child, depth + 1);
    }
  };
  visit(root, 0);
  return largest;
}

/** Opens and checks an uploaded PKCS#12; throws 422 naming the field at fault. */
export function checkPkcs12(bytes: Buffer, passphrase: string, now = new Date()): CheckedCertificate {
  if (bytes.length === 0) throw invalid('certificate', 'choose the .p12 or .pfx file');
  if (bytes.length > MAX_CERTIFICATE_BYTES)
    throw invalid('certificate', `must be at most ${MAX_CERTIFICATE_BYTES / 1024} KB`);
  if (!passphrase) throw invalid('passphrase', "enter the certificate file's passphrase");
  if (passphrase.length > MAX_PASSPHRASE_CHARS)
    throw invalid('passphrase', `must be at most ${MAX_PASSPHRASE_CHARS} characters`);

  let asn1: forge.asn1.Asn1;
  try {
    asn1 = forge.asn1.fromDer(forge.util.createBuffer(bytes.toString('binary')));
  } catch {
    throw invalid('certificate', 'is not a PKCS#12 (.p12 or .pfx) file');
  }
  // forge derives keys synchronously (the MAC key in JavaScript, PBKDF2 on the event loop), so
  // an absurd iteration count anywhere in the file would stall the server: refuse it unopened.
  if (largestIterationCount(asn1) > MAX_KDF_ITERATIONS) {
    throw invalid(
      'certificate',
      `is protected with more than ${MAX_KDF_ITERATIONS} key-derivation iterations; export it again with fewer`,
    );
  }
  let p12: forge.pkcs12.Pkcs12Pfx;
  try {
    p12 = forge.pkcs12.pkcs12FromAsn1(asn1, false, passphrase);
  } catch (error) {
    const message = error instanceof Error ? error.message : '';
    if (/MAC could not be verified|wrong password|Failed to decrypt/i.test(message))
      throw invalid('passphrase', 'does not open this certificate file');
    if (/unsupported|Unknown OID/i.test(message)) {
      throw invalid(
        'certificate',
        'uses an encryption this server cannot read; export it again with AES-256 or triple-DES encryption',
      );
    }
    throw invalid('certificate', 'is not a PKCS#12 (.p12 or .pfx) file');
  }

  const shrouded =
    p12.getBags({ bagType: forge.pki.oids.pkcs8ShroudedKeyBag! })[forge.pki.oids.pkcs8ShroudedKeyBag!] ?? [];
  const plain = p12.getBags({ bagType: forge.pki.oids.keyBag! })[forge.pki.oids.keyBag!] ?? [];
  const keyBag = shrouded[0] ?? plain[0];
  if (!keyBag)
    throw invalid(
      'certificate',
      'holds no private key; export the certificate together with its private key',
    );
  const key = keyBag.key as forge.pki.rsa.PrivateKey | null | undefined;
  if (!key || !('n' in key))
    throw invalid('certificate', 'holds a key of a kind that cannot sign here; an RSA key is needed');
  if (key.n.bitLength() < MIN_RSA_BITS)
    throw invalid(
      'certificate',
      `has an RSA key of ${key.n.bitLength()} bits; at least ${MIN_RSA_BITS} are needed`,
    );

  const certs = (p12.getBags({ bagType: forge.pki.oids.certBag! })[forge.pki.oids.certBag!] ?? []).flatMap(
    (b) => (b.cert ? [b.cert] : []),
  );
  const cert = certs.find((c) => {
    const pub = c.publicKey as forge.pki.rsa.PublicKey;
    return 'n' in pub && pub.n.compareTo(key.n) === 0 && pub.e.compareTo(key.e) === 0;
  });
  if (!cert) throw invalid('certificate', 'holds no certificate for its private key');

  if (now < cert.validity.notBefore)
    throw invalid('certificate', `is not valid before ${dateOnly(cert.validity.notBefore)}`);
  if (now > cert.validity.notAfter)
    throw invalid('certificate', `expired on ${dateOnly(cert.validity.notAfter)}`);
  // RFC 5280 4.2.1.3: without the extension every use is allowed; with it, a document
  // signature needs digitalSignature or nonRepudiation (contentCommitment).
  const usage = cert.getExtension('keyUsage') as {
    digitalSignature?: boolean;
    nonRepudiation?: boolean;
  } | null;
  if (usage && !usage.digitalSignature && !usage.nonRepudiation)
    throw invalid('certificate', 'has a key usage that does not allow digital signatures');

  return { key, cert, chain: certs.filter((c) => c !== cert) };
}

/** The key and its chain in a fresh PKCS#12 under a random passphrase. */
function rewrap(checked: CheckedCertificate): { p12: Buffer; passphrase: string } {
  const passphrase = randomBytes(24).toString('base64url');
  const asn1 = forge.pkcs12.toPkcs12Asn1(checked.key, [checked.cert, ...checked.chain], passphrase, {
    algorithm: 'aes256',
  });
  return { p12: Buffer.from(forge.asn1.toDer(asn1).getBytes(), 'binary'), passphrase };
}

async function trialSignature(p12: Buffer, passphrase: string): Promise<void> {
  const pdf = await PDFDocument.create();
  pdf.addPage([200, 200]);
  try {
    await signPdfWithCertificate(await pdf.save(), p12, passphrase, {
      reason: 'Certificate check',
      name: 'Latchwell',
      contactInfo: '',
      location: '',
      signingTime: new Date(),
    });
  } catch {
    throw invalid(
      'certificate',
      'could not sign a test document; export it again with its private key and certificate',
    );
  }
}

// --- storing and choosing -------------------------------------------------------------------

function statusOf(row: StoredRow): SigningCertificateStatus {
  return {
    source: 'uploaded',
    sha256: row.sha256,
    subject: row.subject,
    issuer: row.issuer,
    selfSigned: row.self_signed,
    notBefore: iso(row.not_before),
    notAfter: iso(row.not_after),
    uploadedAt: iso(row.uploaded_at),
    uploadedBy: row.uploaded_by_label,
  };
}

/** Checks and stores the owner's certificate in place of any earlier upload; audited. */
export async function uploadSigningCertificate(
  organisationId: string,
  bytes: Buffer,
  passphrase: string,
  actor: Actor,
): Promise<SigningCertificateStatus> {
  const checked = checkPkcs12(bytes, passphrase);
  const wrapped = rewrap(checked);
  await trialSignature(wrapped.p12, wrapped.passphrase);
  const facts = factsOf(checked.cert);
  return db().transaction(async (trx) => {
    const before = await trx('organisation_signing_certificates')
      .where({ organisation_id: organisationId })
      .forUpdate()
      .first('sha256');
    const [row] = await trx('organisation_signing_certificates')
      .insert({
        organisation_id: organisationId,
        p12: wrapped.p12,
        passphrase_sealed: sealPassphrase(organisationId, wrapped.passphrase),
        sha256: facts.sha256,
        subject: facts.subject,
        issuer: facts.issuer,
        self_signed: facts.selfSigned,
        not_before: facts.notBefore,
        not_after: facts.notAfter,
        uploaded_by: actor.user.id,
        uploaded_by_label: actor.user.email,
        uploaded_at: trx.fn.now(),
      })
      .onConflict('organisation_id')
      .merge()
      .returning<StoredRow[]>('*');
    await recordAudit(trx, {
      organisationId,
      actorUserId: actor.user.id,
      actorLabel: actor.user.email,
      action: 'organisation.signing_certificate_uploaded',
      entityType: 'organisation',
      entityId: organisationId,
      ip: actor.ip,
      detail: {
        sha256: facts.sha256,
        subject: facts.subject,
        issuer: facts.issuer,
        notBefore: facts.notBefore,
        notAfter: facts.notAfter,
        replaced: before?.sha256 ?? null,
      },
    });
    return statusOf(row!);
  });
}

/** Goes back to the self-made certificate; audited. False when there was no upload. */
export async function removeSigningCertificate(organisationId: string, actor: Actor): Promise<boolean> {
  return db().transaction(async (trx) => {
    const [removed] = await trx('organisation_signing_certificates')
      .where({ organisation_id: organisationId })
      .del()
      .returning('sha256');
    if (!removed) return false;
    await recordAudit(trx, {
      organisationId,
      actorUserId: actor.user.id,
      actorLabel: actor.user.email,
      action: 'organisation.signing_certificate_removed',
      entityType: 'organisation',
      entityId: organisationId,
      ip: actor.ip,
      detail: { sha256: removed.sha256 },
    });
    return true;
  });
}

const generatedFacts = new Map<string, CertificateFacts>();

function generated(organisation: { id: string; name: string }): SigningCertificate {
  const made = organisationCertificate(organisation);
  const cacheKey = `${made.file}:${made.p12.toString('base64').slice(-64)}`;
  let facts = generatedFacts.get(cacheKey);
  if (!facts) {
    const p12 = forge.pkcs12.pkcs12FromAsn1(
      forge.asn1.fromDer(forge.util.createBuffer(made.p12.toString('binary'))),
      false,
      made.passphrase,
    );
    const cert = (p12.getBags({ bagType: forge.pki.oids.certBag! })[forge.pki.oids.certBag!] ?? [])[0]?.cert;
    if (!cert) throw new Error('the generated signing certificate holds no certificate');
    facts = factsOf(cert);
    generatedFacts.set(cacheKey, facts);
  }
  return {
    p12: made.p12,
    passphrase: made.passphrase,
    facts: { ...facts, source: 'generated', uploadedAt: null, uploadedBy: null },
  };
}

/** Why a stored upload cannot sign now, or null when it can. */
function unusableBecause(row: StoredRow, passphrase: string | null, now: Date): string | null {
  if (passphrase === null)
    return 'it cannot be unlocked with this server’s AUTH_SECRET (was the secret changed?); upload it again';
  if (now > row.not_after) return `it expired on ${dateOnly(row.not_after)}`;
  if (now < row.not_before) return `it is not valid before ${dateOnly(row.not_before)}`;
  return null;
}

/** The certificate to sign with now: the owner's upload while it is usable, else the self-made one. */
export async function signingCertificateFor(
  organisation: { id: string; name: string },
  knex: Knex = db(),
  now = new Date(),
): Promise<SigningCertificate> {
  const row = await knex('organisation_signing_certificates')
    .where({ organisation_id: organisation.id })
    .first<StoredRow | undefined>('*');
  if (row) {
    const passphrase = unsealPassphrase(organisation.id, row.passphrase_sealed);
    const reason = unusableBecause(row, passphrase, now);
    if (!reason) return { p12: row.p12, passphrase: passphrase!, facts: statusOf(row) };
    console.error(
      `[signing] the uploaded certificate of organisation ${organisation.id} is not used: ${reason}`,
    );
  }
  return generated(organisation);
}

/** What the settings page and the API show. */
export async function certificateOverview(
  organisation: { id: string; name: string },
  now = new Date(),
): Promise<CertificateOverview> {
  const row = await db()('organisation_signing_certificates')
    .where({ organisation_id: organisation.id })
    .first<StoredRow | undefined>('*');
  if (row) {
    const reason = unusableBecause(row, unsealPassphrase(organisation.id, row.passphrase_sealed), now);
    if (!reason) return { inUse: statusOf(row), unusable: null };
    return { inUse: generated(organisation).facts, unusable: { ...statusOf(row), reason } };
  }
  return { inUse: generated(organisation).facts, unusable: null };
}
