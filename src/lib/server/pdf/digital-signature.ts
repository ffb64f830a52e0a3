/**
 * Signs a finished PDF with the organisation's certificate so any PDF reader can tell whether
 * a byte changed since: ISO 32000-1 12.8 (digital signatures), a byte-range signature whose
 * /Contents holds a detached PKCS#7 / CMS SignedData (RFC 5652) over every byte of the file
 * except the /Contents value itself (SubFilter adbe.pkcs7.detached).
 */
import { pdflibAddPlaceholder } from '@signpdf/placeholder-pdf-lib';
import { P12Signer } from '@signpdf/signer-p12';
import { SignPdf } from '@signpdf/signpdf';
import { PDFDocument } from 'pdf-lib';

export interface SignatureDetails {
  /** Why the document is signed, shown by readers in the signature panel. */
  reason: string;
  /** The signing organisation's name. */
  name: string;
  contactInfo: string;
  location: string;
  signingTime: Date;
}

/**
 * Room for the PKCS#7 blob: a 2048-bit RSA signature plus one certificate fits well in 8 KiB.
 * An uploaded certificate may bring a chain: its PKCS#12 size plus 4 KiB is always enough.
 */
const SIGNATURE_LENGTH = 8192;

export async function signPdfWithCertificate(
  pdf: Uint8Array,
  p12: Buffer,
  passphrase: string,
  details: SignatureDetails,
): Promise<Buffer> {
  const pdfDoc = await PDFDocument.load(pdf, { updateMetadata: false });
  pdflibAddPlaceholder({
    pdfDoc,
    reason: details.reason,
    contactInfo: details.contactInfo,
    name: details.name,
    location: details.location,
    signingTime: details.signingTime,
    signatureLength: Math.max(SIGNATURE_LENGTH, p12.length + 4096),
    appName: 'Latchwell',
  });
  // Classic cross-reference table, no object streams: the placeholder must stay findable as
  // plain bytes for the byte-range computation.
  const withPlaceholder = Buffer.from(await pdfDoc.save({ useObjectStreams: false }));
  const signer = new P12Signer(p12, { passphrase });
  return new SignPdf().sign(withPlaceholder, signer, details.signingTime);
}
