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
import { extractPdfText } from '../../support/pdf-text';
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
    // Imperial organisation: lengths in inches.
    expect(text).toMatch(/144\.09 in wide/);
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

  it('embeds Noto Sans and spells out symbols the font lacks', async () => {
    const source = await sampleReportSource({ findings: 3, photos: 0 });
    source.client.name = 'Łucja Ærøskøbing ≥ household';
    const pdf = await renderReportPdf(buildReportModel(source));
    expect(pdf.includes(Buffer.from('NotoSans'))).toBe(true);
    expect(await extractPdfText(pdf)).toContain('Łucja Ærøskøbing at least household');
  }, 30_000);
});
