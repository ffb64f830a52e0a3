/**
 * Sending a scored assessment for the owner's signature, the public signing link, and the
 * signature itself with the final, digitally signed document. See DEVELOPERS.md, "Reports,
 * signatures and mail".
 */
export {
  SendForSignatureSchema,
  SignatureSubmitSchema,
  SIGN_LINK_DEFAULT_DAYS,
  SIGN_LINK_MAX_DAYS,
  SIGNATURE_BODY_LIMIT,
  CONSENT_TEXT,
  INTENT_TEXT,
  type SignatureSubmit,
} from './schemas';
export {
  describeSignLink,
  linkProblem,
  linkStateMessage,
  signingCopyForLink,
  type LinkState,
  type SignPageView,
} from './links';
export { signRequestMail, signedReportMail } from './mails';
export { sendForSignature, type RequestFacts, type SentForSignature } from './send';
export { submitSignature, type SignedOutcome } from './sign';
export { signingStatus, type SigningStatus } from './status';
