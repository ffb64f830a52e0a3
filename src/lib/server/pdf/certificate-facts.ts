/**
 * What a person needs to know about a signing certificate: its SHA-256 fingerprint (over the
 * DER encoding, as PDF readers and `openssl x509 -fingerprint -sha256` show it), subject,
 * issuer, validity, and whether it is self-made (issuer = subject, so no public certificate
 * authority vouches for it and readers show the signer's identity as unknown).
 */
import { createHash } from 'node:crypto';
import forge from 'node-forge';

export interface CertificateFacts {
  /** SHA-256 of the certificate's DER bytes, 64 lower-case hex digits. */
  sha256: string;
  subject: string;
  issuer: string;
  selfSigned: boolean;
  notBefore: string;
  notAfter: string;
}

function distinguishedName(attributes: forge.pki.CertificateField[]): string {
  return attributes.map((a) => `${a.shortName ?? a.name ?? a.type}=${String(a.value)}`).join(', ');
}

export function certificateDer(cert: forge.pki.Certificate): Buffer {
  return Buffer.from(forge.asn1.toDer(forge.pki.certificateToAsn1(cert)).getBytes(), 'binary');
}

export function factsOf(cert: forge.pki.Certificate): CertificateFacts {
  return {
    sha256: createHash('sha256').update(certificateDer(cert)).digest('hex'),
    subject: distinguishedName(cert.subject.attributes),
    issuer: distinguishedName(cert.issuer.attributes),
    selfSigned: cert.isIssuer(cert),
    notBefore: cert.validity.notBefore.toISOString(),
    notAfter: cert.validity.notAfter.toISOString(),
  };
}

/** `3A:4B:…`: the way certificate viewers print a fingerprint. */
export function fingerprintInWords(sha256: string): string {
  return (sha256.toUpperCase().match(/../g) ?? []).join(':');
}

/** The certificate whose key signed a PDF (ISO 32000-1 12.8: the CMS in /Contents), or null. */
export function signerCertificateOfPdf(pdf: Buffer): CertificateFacts | null {
  const at = pdf.lastIndexOf('/ByteRange');
  if (at < 0) return null;
  const range = /\/ByteRange\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s+(\d+)\s*\]/.exec(
    pdf.subarray(at, at + 120).toString('latin1'),
  );
  if (!range) return null;
  const [start, length, next] = [Number(range[1]), Number(range[2]), Number(range[3])];
  const hex = pdf
    .subarray(start + length, next)
    .toString('latin1')
    .replace(/[<>\s]/g, '');
  try {
    // The placeholder is zero-padded after the DER: parse the value, not the padding.
    const der = forge.util.hexToBytes(hex);
    const message = forge.pkcs7.messageFromAsn1(
      forge.asn1.fromDer(der, { parseAllBytes: false } as unknown as boolean),
    ) as forge.pkcs7.PkcsSignedData & {
      rawCapture?: { signerInfos?: forge.asn1.Asn1[] };
    };
    const certificates = message.certificates;
    // SignerInfo ::= SEQUENCE { version, issuerAndSerialNumber SEQUENCE { issuer, serialNumber }, … }
    const signerInfo = message.rawCapture?.signerInfos?.[0];
    const serialNode = (signerInfo?.value as forge.asn1.Asn1[] | undefined)?.[1]?.value as
      forge.asn1.Asn1[] | undefined;
    const serial = serialNode?.[1]
      ? forge.util.bytesToHex(serialNode[1].value as string).toLowerCase()
      : null;
    const signer =
      certificates.find((c) => serial !== null && c.serialNumber.toLowerCase() === serial) ?? certificates[0];
    return signer ? factsOf(signer) : null;
  } catch {
    return null;
  }
}
