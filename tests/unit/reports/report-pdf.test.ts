/**
 * The report renders from the stored result alone and reads back as text: verdict in plain
 * words, every failing finding with its fix and reference, the cautions, the disclaimer, the
 * ruleset identity and page numbers; missing drawings are skipped, not fatal.
 */
import { describe, expect, it } from 'vitest';
import {
  buildReportModel,
  cautionsOf,
  ReportNotReady,
  StoredResultSchema,
} from '../../../src/lib/server/pdf/report-model';
import { renderReportPdf } from '../../../src/lib/server/pdf/render';
import { extractPdfPages, extractPdfText } from '../../support/pdf-text';
import { sampleReportSource, sampleResult } from '../../support/sample-report';

describe('report model', () => {
  it('orders failing findings critical first and lists one caution per distinct text', () => {
    const result = StoredResultSchema.parse(sampleResult(20));
    const cautions = cautionsOf(result);
    const failing = result.findings.filter((f) => f.outcome === 'fail');
    expect(cautions).toHaveLength(failing.length);
    const order = ['critical', 'major', 'minor'];
    const ranks = cautions.map((c) => order.indexOf(c.severity));
    expect([...ranks].sort((a, b) => a - b)).toEqual(ranks);
  });

  it('attaches a photo to the finding whose rule it names and keeps unclaimed photos', async () => {
    const source = await sampleReportSource({ findings: 9, photos: 4 });
    source.photos[3].itemKey = 'somethingElse';
    const model = buildReportModel(source);
    expect(model.failing.flatMap((f) => f.photos)).toHaveLength(3);
    expect(model.otherPhotos.map((p) => p.itemKey)).toEqual(['somethingElse']);
  });

  it('refuses an assessment without a stored result rather than scoring it', async () => {
    const source = await sampleReportSource({ photos: 0 });
    source.assessment.result = null;
    expect(() => buildReportModel(source)).toThrow(ReportNotReady);
  });
});

describe('report PDF', () => {
  it('reads back with verdict, findings, fixes, references, cautions, disclaimer, ruleset and page numbers', async () => {
    const source = await sampleReportSource({ findings: 20, photos: 3 });
    const pdf = await renderReportPdf(buildReportModel(source));
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const text = await extractPdfText(pdf);
    expect(text).toContain('Take out of automatic use');
    expect(text).toContain('At least one critical hazard was found.');
    for (const f of sampleResult(20).findings.filter((x) => x.outcome === 'fail')) {
      expect(text).toContain(f.title);
      expect(text).toContain(f.remediation);
      expect(text).toContain(f.caution);
      expect(text).toContain(`${f.reference.standard}, ${f.reference.clause}`);
    }
    expect(text).toContain('supports, and does not replace');
    expect(text).toContain('authority having jurisdiction');
    expect(text).toContain('North American residential gates, version 2026.1');
    expect(text).toContain('a'.repeat(64));
    expect(text).toContain(`Document ${source.documentId}`);
    expect(text).toMatch(/Page 1 of (\d+)/);
    expect(text).toContain('Operator geometry (top view)');
    expect(text).toContain('Force trace: Closing edge, 300 mm gap');
    // The gate's size and each measurement as entered; other lengths in the organisation's
    // system (imperial: feet and inches to 1/16 in), limits rounded say "about".
    expect(text).toContain('12 ft × 5 ft (width × height)');
    expect(text).toContain('gap item0: 30 mm');
    expect(text).toContain('gap item3: 1-5/16 in');
    expect(text).toContain('max gap: about 1 in');
    expect(text).toContain('Limit 89.9 lbf');
    expect(text).not.toMatch(/\d+\.\d{2} in/);
  }, 30_000);

  it('skips the drawings when the assessment has no geometry or trace', async () => {
    const source = await sampleReportSource({ findings: 6, photos: 0 });
    source.assessment.swingGeometry = null;
    source.forceTraces = [];
    const text = await extractPdfText(await renderReportPdf(buildReportModel(source)));
    expect(text).not.toContain('Operator geometry');
    expect(text).not.toContain('Force trace:');
    expect(text).toContain('Cautions for the owner');
  }, 30_000);

  const rulesetDisclaimer =
    "This assessment supports, and never replaces, a qualified gate technician, the manufacturer's instructions, local codes and the authority having jurisdiction.";

  it('prints the disclaimer once, not again inside every caution', async () => {
    const source = await sampleReportSource({ findings: 9, photos: 0 });
    const result = source.assessment.result as ReturnType<typeof sampleResult>;
    for (const f of result.findings) f.caution = `${f.caution} ${rulesetDisclaimer}`;
    const model = buildReportModel(source);
    expect(model.cautions.map((c) => c.caution)).toContain(
      'Keep hands and feet away from this part of the gate while it moves (item 1).',
    );
    const text = await extractPdfText(await renderReportPdf(model));
    expect(text.split('authority having jurisdiction').length - 1).toBe(1);
    expect(text).toContain('Keep hands and feet away from this part of the gate while it moves (item 1).');
  }, 30_000);

  it('keeps every finding on one page with its photos and leaves no heading at a page foot', async () => {
    const headings = [
      'What needs fixing',
      'Checks that need more information',
      'Measurements',
      'Further photos',
      'Checks passed',
      'Cautions for the owner',
      'Signatures',
      'Record',
    ];
    // Layouts that put page breaks in different places: more findings, more photos, signed.
    for (const [findings, photos, signed] of [
      [9, 9, false],
      [12, 12, true],
      [24, 14, true],
      [30, 20, false],
    ] as const) {
      const source = await sampleReportSource({ findings, photos });
      if (signed)
        source.signing = {
          assessor: { name: 'Rowan Tessier', signedAt: new Date('2026-11-21T09:00:00Z') },
          owner: {
            name: 'Imke Quillfeather',
            email: 'home@quillfeather.test',
            signedAt: new Date('2026-11-22T09:00:00Z'),
            method: 'typed',
            imagePng: null,
            ip: null,
            userAgent: null,
            shownPdfSha256: 'd'.repeat(64),
            consentText: 'I agree to sign electronically.',
            intentText: 'I have read this report.',
            cautionsAcknowledged: [],
          },
        };
      const model = buildReportModel(source);
      const pages = await extractPdfPages(await renderReportPdf(model));
      for (const finding of model.failing) {
        const page = pages.find((p) => p.includes(` · ${finding.ruleId}`));
        expect(page, finding.title).toBeDefined();
        for (const photo of finding.photos)
          expect(page, `${finding.title}: ${photo.caption}`).toContain(`${photo.caption} ·`);
      }
      for (const [i, page] of pages.entries())
        for (const heading of headings)
          expect(page.endsWith(heading), `page ${i + 1} of ${findings}/${photos} ends with ${heading}`).toBe(
            false,
          );
    }
  }, 120_000);

  it('embeds Noto Sans and spells out symbols the font lacks', async () => {
    const source = await sampleReportSource({ findings: 3, photos: 0 });
    source.client.name = 'Łucja Ærøskøbing ≥ household';
    const pdf = await renderReportPdf(buildReportModel(source));
    expect(pdf.includes(Buffer.from('NotoSans'))).toBe(true);
    expect(await extractPdfText(pdf)).toContain('Łucja Ærøskøbing at least household');
  }, 30_000);
});
