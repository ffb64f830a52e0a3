/**
 * Stored results and scored records are read strictly: a malformed critical finding is an
 * error naming the field, never printed with a default severity.
 */
import { describe, expect, it } from 'vitest';
import { CorruptRecordError } from '../../../src/lib/server/errors';
import { parseScoredRecord } from '../../../src/lib/server/assessments/scored-record';
import { buildReportModel } from '../../../src/lib/server/pdf/report-model';
import { sampleReportSource, sampleResult } from '../../support/sample-report';

function withMalformedCritical() {
  const result = sampleResult(9);
  const critical = result.findings.find((f) => f.outcome === 'fail' && f.severity === 'critical');
  if (!critical) throw new Error('the sample has a failing critical finding');
  (critical as Record<string, unknown>).severity = 'CRITICAL!';
  return { result, ruleId: critical.ruleId };
}

describe('a stored result is read strictly', () => {
  it('refuses a report whose critical finding has a malformed severity, rather than printing it as minor', async () => {
    const source = await sampleReportSource({ findings: 9, photos: 0 });
    const { result } = withMalformedCritical();
    source.assessment.result = result;
    expect(() => buildReportModel(source)).toThrow(CorruptRecordError);
    try {
      buildReportModel(source);
    } catch (error) {
      expect((error as CorruptRecordError).reason).toMatch(/findings\.0\.severity/);
    }
  });

  it('refuses a finding with no outcome or an unknown verdict', async () => {
    const source = await sampleReportSource({ findings: 9, photos: 0 });
    const result = sampleResult(9) as Record<string, unknown>;
    delete (result.findings as Array<Record<string, unknown>>)[1].outcome;
    source.assessment.result = result;
    expect(() => buildReportModel(source)).toThrow(CorruptRecordError);
    source.assessment.result = { ...sampleResult(9), verdict: 'fine' };
    expect(() => buildReportModel(source)).toThrow(CorruptRecordError);
  });

  it('still builds the model from a well-formed result', async () => {
    const source = await sampleReportSource({ findings: 9, photos: 0 });
    const model = buildReportModel(source);
    expect(model.failing[0].severity).toBe('critical');
  });
});

describe('a scored record is read strictly', () => {
  const record = () => ({
    format: 1,
    source: 'submit',
    frozenAt: '2026-11-20T17:00:00+00:00',
    purpose: 'inspection',
    visitedOn: '2026-11-20T15:00:00+00:00',
    submittedAt: '2026-11-20T17:00:00+00:00',
    organisation: { id: 'o1', name: 'Example Gate Care' },
    auditor: { id: 'u1', name: 'Ada Auditor', email: 'ada@example.test' },
    gate: {
      id: 'g1',
      siteId: 's1',
      clientId: 'c1',
      label: 'Driveway gate',
      kind: 'swing',
      leaves: 'double',
      openingDirection: 'pull_to_open',
      widthMm: 3660,
      heightMm: 1520,
      weightKg: 140,
      entered: {},
      operator: {},
      installedOn: null,
    },
    site: {
      id: 's1',
      name: null,
      addressLine1: '27 Fernhollow Way',
      addressLine2: null,
      city: 'Marrowfield',
      region: 'CO',
      postalCode: '80999',
      country: 'US',
      usageClass: 1,
    },
    client: { id: 'c1', name: 'Fernhollow Household', kind: 'homeowner', contactEmail: null, phone: null },
    ruleset: {
      versionId: 'v1',
      family: 'north-american-gate',
      version: '2026.1',
      title: 'Checks',
      contentSha256: 'a'.repeat(64),
      areas: [{ key: 'pinch', title: 'Pinch points' }],
    },
    answers: {},
    measurements: {},
    observations: {},
    result: sampleResult(9),
    resultSha256: 'b'.repeat(64),
  });

  it('parses a well-formed record', () => {
    expect(parseScoredRecord('a1', record()).gate.widthMm).toBe(3660);
  });

  it('refuses a record whose critical finding is malformed, one without a gate width type, and none at all', () => {
    const bad = record();
    bad.result = withMalformedCritical().result;
    expect(() => parseScoredRecord('a1', bad)).toThrow(CorruptRecordError);
    const badGate = record() as { gate: Record<string, unknown> };
    badGate.gate.widthMm = '3660';
    expect(() => parseScoredRecord('a1', badGate)).toThrow(/damaged/);
    expect(() => parseScoredRecord('a1', null)).toThrow(CorruptRecordError);
  });
});
