/** The e-mails of the signing flow: the link, the verdict in words, the expiry, no markup injection. */
import { describe, expect, it } from 'vitest';
import { SignatureSubmitSchema, signedReportMail, signRequestMail } from '../../../src/lib/server/signing';

describe('signing e-mails', () => {
  const input = {
    organisationName: 'Ironbark <Gate> Works',
    clientName: 'Quillfeather & Sons',
    gateLabel: 'Driveway gate',
    siteLine: '9 Larchmere Rise, Marrowfield',
    verdict: 'remedy' as const,
    link: 'https://gates.example.test/sign/' + 'a'.repeat(43),
    expiresAt: new Date('2026-12-16T12:00:00Z'),
    timeZone: 'America/Denver',
  };

  it('carries the link, the verdict and the expiry date in the organisation’s time zone', () => {
    const mail = signRequestMail(input);
    expect(mail.subject).toBe('Please read and sign: gate safety report for Driveway gate');
    expect(mail.text).toContain(input.link);
    expect(mail.text).toContain('Verdict: Fix by a date.');
    expect(mail.text).toContain('expires on Dec 16, 2026, 5:00 AM MST');
  });

  it('escapes names in the HTML part', () => {
    const { html } = signRequestMail(input);
    expect(html).toContain('Ironbark &lt;Gate&gt; Works');
    expect(html).toContain('Quillfeather &amp; Sons');
    expect(html).not.toContain('<Gate>');
  });

  it('names the document and its SHA-256 in the signed-report mails', () => {
    const owner = signedReportMail({
      kind: 'owner',
      organisationName: 'Ironbark',
      gateLabel: 'Driveway gate',
      signerName: 'Imke',
      sha256: 'f'.repeat(64),
      documentId: 'doc-1',
      verdict: 'remedy',
    });
    expect(owner.text).toContain(`SHA-256 ${'f'.repeat(64)}`);
    const copy = signedReportMail({
      kind: 'organisation',
      organisationName: 'Ironbark',
      gateLabel: 'Driveway gate',
      signerName: 'Imke',
      sha256: 'f'.repeat(64),
      documentId: 'doc-1',
      verdict: 'remedy',
    });
    expect(copy.subject).toBe('Signed: gate safety report for Driveway gate (Imke)');
  });
});

describe('e-mails about a gate to take out of service', () => {
  const manualNow = /Switch the gate to manual operation now/;

  it('tell the owner first thing to switch the gate to manual operation', () => {
    const request = signRequestMail({
      organisationName: 'Ironbark',
      clientName: 'Imke',
      gateLabel: 'Driveway gate',
      siteLine: '9 Larchmere Rise',
      verdict: 'withdraw',
      link: 'https://gates.example.test/sign/x',
      expiresAt: new Date('2026-12-16T12:00:00Z'),
      timeZone: 'UTC',
    });
    expect(request.text.split('\n')[2]).toMatch(manualNow);
    expect(request.html).toMatch(manualNow);
    const facts = { organisationName: 'Ironbark', gateLabel: 'Driveway gate', signerName: 'Imke' };
    const signed = { sha256: 'f'.repeat(64), documentId: 'doc-1', verdict: 'withdraw' as const };
    expect(signedReportMail({ kind: 'owner', ...facts, ...signed }).text.split('\n')[2]).toMatch(manualNow);
    expect(signedReportMail({ kind: 'organisation', ...facts, ...signed }).text).toMatch(manualNow);
  });

  it('say nothing of manual operation when the gate may stay in use', () => {
    const facts = { organisationName: 'Ironbark', gateLabel: 'Driveway gate', signerName: 'Imke' };
    for (const verdict of ['clear', 'remedy'] as const) {
      const mail = signedReportMail({ kind: 'owner', ...facts, sha256: 'f', documentId: 'd', verdict });
      expect(mail.text).not.toMatch(manualNow);
    }
  });
});

describe('signature submission schema', () => {
  const valid = {
    name: 'Imke Quillfeather',
    consent: true,
    intent: true,
    acknowledgedCautions: [],
    shownPdfSha256: 'a'.repeat(64),
    signature: { method: 'typed' },
  };

  it('accepts a typed mark and a drawn PNG data URL', () => {
    expect(SignatureSubmitSchema.safeParse(valid).success).toBe(true);
    expect(
      SignatureSubmitSchema.safeParse({
        ...valid,
        signature: { method: 'drawn', png: 'data:image/png;base64,iVBORw0KGgo=' },
      }).success,
    ).toBe(true);
  });

  it('refuses missing consent or intent, a one-letter name, a bad hash and anything but a PNG data URL', () => {
    for (const bad of [
      { ...valid, consent: false },
      { ...valid, intent: false },
      { ...valid, name: 'I' },
      { ...valid, shownPdfSha256: 'A'.repeat(64) },
      { ...valid, signature: { method: 'drawn', png: 'data:image/svg+xml;base64,PHN2Zz4=' } },
      { ...valid, signature: { method: 'drawn' } },
      { ...valid, extra: true },
    ]) {
      expect(SignatureSubmitSchema.safeParse(bad).success).toBe(false);
    }
  });
});
