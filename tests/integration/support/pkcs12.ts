/**
 * PKCS#12 files for certificate-upload tests, made here with node-forge (keys from Node's
 * crypto, which is fast): a leaf certificate issued by a small test authority, or self-made,
 * with the validity and key usage a test asks for.
 */
import { createHash, generateKeyPair, randomBytes } from 'node:crypto';
import { promisify } from 'node:util';
import forge from 'node-forge';

export interface TestPkcs12 {
  p12: Buffer;
  passphrase: string;
  /** SHA-256 of the leaf certificate's DER, lower-case hex. */
  sha256: string;
  commonName: string;
}

/** Made off the event loop: a test that blocks it can miss the server closing an idle keep-alive socket. */
async function rsaKeys(bits = 2048) {
  const { privateKey, publicKey } = await promisify(generateKeyPair)('rsa', { modulusLength: bits });
  return {
    privateKey: forge.pki.privateKeyFromPem(privateKey.export({ type: 'pkcs1', format: 'pem' }).toString()),
    publicKey: forge.pki.publicKeyFromPem(publicKey.export({ type: 'spki', format: 'pem' }).toString()),
  };
}

const day = 24 * 60 * 60 * 1000;

export async function makePkcs12(
  options: {
    commonName?: string;
    passphrase?: string;
    /** Days from now; negative is in the past. */
    validFromDays?: number;
    validToDays?: number;
    keyUsage?: Record<string, boolean>;
    /** Issued by a test authority (its certificate goes into the file too) rather than self-made. */
    issued?: boolean;
  } = {},
): Promise<TestPkcs12> {
  const commonName = options.commonName ?? `Test Signer ${randomBytes(3).toString('hex')}`;
  const passphrase = options.passphrase ?? `pass-${randomBytes(6).toString('hex')}`;
  const leafKeys = await rsaKeys();
  const subject = [
    { name: 'commonName', value: commonName },
    { name: 'organizationName', value: 'Test Gate Works' },
  ];
  let issuerAttrs = subject;
  let signingKey = leafKeys.privateKey;
  const chain: forge.pki.Certificate[] = [];
  if (options.issued) {
    const caKeys = await rsaKeys();
    const ca = forge.pki.createCertificate();
    ca.publicKey = caKeys.publicKey;
    ca.serialNumber = `01${randomBytes(8).toString('hex')}`;
    ca.validity.notBefore = new Date(Date.now() - 30 * day);
    ca.validity.notAfter = new Date(Date.now() + 3650 * day);
    issuerAttrs = [{ name: 'commonName', value: 'Test Issuing Authority' }];
    ca.setSubject(issuerAttrs);
    ca.setIssuer(issuerAttrs);
    ca.setExtensions([
      { name: 'basicConstraints', cA: true, critical: true },
      { name: 'keyUsage', keyCertSign: true, cRLSign: true, critical: true },
    ]);
    ca.sign(caKeys.privateKey, forge.md.sha256.create());
    chain.push(ca);
    signingKey = caKeys.privateKey;
  }
  const leaf = forge.pki.createCertificate();
  leaf.publicKey = leafKeys.publicKey;
  leaf.serialNumber = `02${randomBytes(8).toString('hex')}`;
  leaf.validity.notBefore = new Date(Date.now() + (options.validFromDays ?? -1) * day);
  leaf.validity.notAfter = new Date(Date.now() + (options.validToDays ?? 365) * day);
  leaf.setSubject(subject);
  leaf.setIssuer(issuerAttrs);
  leaf.setExtensions([
    { name: 'basicConstraints', cA: false },
    {
      name: 'keyUsage',
      critical: true,
      ...(options.keyUsage ?? { digitalSignature: true, nonRepudiation: true }),
    },
  ]);
  leaf.sign(signingKey, forge.md.sha256.create());
  const asn1 = forge.pkcs12.toPkcs12Asn1(leafKeys.privateKey, [leaf, ...chain], passphrase, {
    algorithm: '3des',
  });
  const der = Buffer.from(forge.asn1.toDer(forge.pki.certificateToAsn1(leaf)).getBytes(), 'binary');
  return {
    p12: Buffer.from(forge.asn1.toDer(asn1).getBytes(), 'binary'),
    passphrase,
    sha256: createHash('sha256').update(der).digest('hex'),
    commonName,
  };
}

/**
 * The certificate that signed a PDF, read the long way round (ISO 32000-1 12.8): the bytes
 * between the two signed ranges of /ByteRange are the hex /Contents, a CMS SignedData
 * (RFC 5652) whose SignerInfo names the signer's issuer and serial number.
 */
export function pdfSignerSha256(pdf: Buffer): string {
  const text = pdf.toString('latin1');
  const ranges = [...text.matchAll(/\/ByteRange\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s+(\d+)\s*\]/g)];
  const last = ranges.at(-1);
  if (!last) throw new Error('the PDF has no signature');
  const contents = text.slice(Number(last[1]) + Number(last[2]), Number(last[3])).replace(/[<>\s]/g, '');
  const asn1 = forge.asn1.fromDer(forge.util.hexToBytes(contents), {
    parseAllBytes: false,
  } as unknown as boolean);
  const cms = forge.pkcs7.messageFromAsn1(asn1) as forge.pkcs7.PkcsSignedData & {
    rawCapture: { signerInfos: forge.asn1.Asn1[] };
  };
  const issuerAndSerial = (cms.rawCapture.signerInfos[0]!.value as forge.asn1.Asn1[])[1]!
    .value as forge.asn1.Asn1[];
  const serial = forge.util.bytesToHex(issuerAndSerial[1]!.value as string);
  const signer = cms.certificates.find((c) => c.serialNumber.toLowerCase() === serial.toLowerCase());
  if (!signer) throw new Error('no certificate in the signature matches its signer');
  const der = Buffer.from(forge.asn1.toDer(forge.pki.certificateToAsn1(signer)).getBytes(), 'binary');
  return createHash('sha256').update(der).digest('hex');
}
