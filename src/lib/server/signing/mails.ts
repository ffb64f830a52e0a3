/**
 * The e-mails of the signing flow: the link to sign, and the signed report to the signer and
 * to the office. Plain text first; the HTML part escapes every name.
 */
import { formatDayTime } from '@/lib/vocabulary';
import { verdictWords, type Verdict } from '../pdf/report-model';

function escapeHtml(text: string): string {
  return text.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

/**
 * Said first in every e-mail about a gate whose verdict is withdraw, in words that tell the
 * reader what to do now rather than what the verdict is called.
 */
export const WITHDRAW_ACTION_WORDS =
  'Switch the gate to manual operation now: turn the operator off or use its manual release, and do not let it open or close by itself until the fixes are done and checked. At least one critical hazard was found.';

export function signRequestMail(input: {
  organisationName: string;
  clientName: string;
  gateLabel: string;
  siteLine: string;
  verdict: Verdict;
  link: string;
  expiresAt: Date;
  timeZone: string;
}): { subject: string; text: string; html: string } {
  const words = verdictWords[input.verdict];
  const until = formatDayTime(input.expiresAt, input.timeZone);
  const subject = `Please read and sign: gate safety report for ${input.gateLabel}`;
  const text = [
    `Hello ${input.clientName},`,
    '',
    ...(input.verdict === 'withdraw' ? [WITHDRAW_ACTION_WORDS, ''] : []),
    `${input.organisationName} has assessed the ${input.gateLabel} at ${input.siteLine}.`,
    `Verdict: ${words.label}. ${words.headline}`,
    '',
    'Please read the report and acknowledge it, with its cautions, on this page (no account needed):',
    input.link,
    '',
    `The link works once and expires on ${until}.`,
    'If you did not expect this message, you can ignore it.',
    '',
    input.organisationName,
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(input.clientName)},</p>
${input.verdict === 'withdraw' ? `<p><strong>${escapeHtml(WITHDRAW_ACTION_WORDS)}</strong></p>\n` : ''}<p>${escapeHtml(input.organisationName)} has assessed the ${escapeHtml(input.gateLabel)} at ${escapeHtml(input.siteLine)}.</p>
<p><strong>Verdict: ${escapeHtml(words.label)}.</strong> ${escapeHtml(words.headline)}</p>
<p><a href="${escapeHtml(input.link)}">Read and sign the report</a> (no account needed). The link works once and expires on ${escapeHtml(until)}.</p>
<p>If you did not expect this message, you can ignore it.</p>
<p>${escapeHtml(input.organisationName)}</p>`;
  return { subject, text, html };
}

export function signedReportMail(input: {
  kind: 'owner' | 'organisation';
  organisationName: string;
  gateLabel: string;
  signerName: string;
  sha256: string;
  documentId: string;
  verdict: Verdict;
}): { subject: string; text: string } {
  const withdraw = input.verdict === 'withdraw' ? [WITHDRAW_ACTION_WORDS, ''] : [];
  if (input.kind === 'owner') {
    return {
      subject: `Your signed gate safety report: ${input.gateLabel}`,
      text: [
        `Hello ${input.signerName},`,
        '',
        ...withdraw,
        `Thank you for signing. Your copy of the gate safety report for the ${input.gateLabel} is attached, signed by you and digitally signed by ${input.organisationName}.`,
        'Keep it with the gate’s papers. Please follow the cautions you acknowledged until the fixes are done.',
        '',
        `Document ${input.documentId}`,
        `SHA-256 ${input.sha256}`,
        '',
        input.organisationName,
      ].join('\n'),
    };
  }
  return {
    subject: `Signed: gate safety report for ${input.gateLabel} (${input.signerName})`,
    text: [
      ...withdraw,
      `${input.signerName} signed the gate safety report for the ${input.gateLabel}. The signed document is attached and kept in the archive.`,
      '',
      `Document ${input.documentId}`,
      `SHA-256 ${input.sha256}`,
    ].join('\n'),
  };
}
