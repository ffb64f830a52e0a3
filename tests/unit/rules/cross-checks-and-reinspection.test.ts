import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { euSwingGate } from './fixtures/european-powered-gate';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, NO, YES } from './support/inputs';
import { shipped } from './support/shipped';

const na = shipped('north-american-gate', '2026.2');
const eu = shipped('european-powered-gate', '2026.2');

/** The swing gate with its photo-eye taken off the device list: operator sensing (A) and an edge (B2) only. */
const noPhotoEye = applyPatch(naSwingGate(), {
  entrapment: {
    devices: [
      { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
      { type: 'B2', direction: 'closing', zone: 'closing_edge', monitored: true },
      { type: 'A', direction: 'opening', zone: 'open_side', monitored: true },
      { type: 'B2', direction: 'opening', zone: 'open_side', monitored: true },
    ],
  },
});

describe('answers cross-checked against the devices listed', () => {
  it('flags "the photo-eye reverses the gate" with no photo-eye listed, and does not accept the answer', () => {
    // UL 325 type B1 non-contact sensor (secondary source): a function test needs the device to exist
    const result = score(noPhotoEye, na);
    expect(result.contradictions).toEqual([
      {
        id: 'sensing.photo-eye-listed',
        message: expect.stringContaining('no photo-eye'),
        facts: ['answers.photoEyeTestReverses'],
      },
    ]);
    const finding = result.findings.find((f) => f.ruleId === 'sensing.photo-eye-works')!;
    expect(finding.outcome).toBe('needs_info');
    expect(finding.missing[0]!.prompt).toMatch(/^Resolve: /);
    expect(result.complete).toBe(false);
    expect(result.needsInfo.map((n) => n.key)).toContain('answers.photoEyeTestReverses');
    // 2026.1 accepted the answer and passed the rule
    expect(
      score(noPhotoEye, shipped('north-american-gate', '2026.1')).findings.find(
        (f) => f.ruleId === 'sensing.photo-eye-works',
      )!.outcome,
    ).toBe('pass');
  });

  it('flags "edge tested" with no edge listed', () => {
    // UL 325 type B2 contact sensor (secondary source)
    const noEdge = applyPatch(naSlideGate(), {
      entrapment: {
        devices: [
          { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
          { type: 'B1', direction: 'closing', zone: 'closing_edge', monitored: true },
          { type: 'A', direction: 'opening', zone: 'post_gap', monitored: true },
          { type: 'B1', direction: 'opening', zone: 'post_gap', monitored: true },
        ],
      },
    });
    const result = score(noEdge, na);
    expect(result.contradictions?.map((c) => c.id)).toEqual(['sensing.edge-listed']);
    expect(result.findings.find((f) => f.ruleId === 'sensing.edge-works')!.outcome).toBe('needs_info');
  });

  it('finds nothing to resolve when the answer fits the devices (or says the test does not apply)', () => {
    expect(score(naSwingGate(), na).contradictions).toEqual([]);
    const saysNa = applyPatch(noPhotoEye, { answers: { photoEyeTestReverses: { value: 'na' } } });
    expect(score(saysNa, na).contradictions).toEqual([]);
    // "no" with no photo-eye is not a contradiction either: the failed test stands
    expect(
      score(applyPatch(noPhotoEye, { answers: { photoEyeTestReverses: NO } }), na).contradictions,
    ).toEqual([]);
  });

  it('cross-checks the European family the same way', () => {
    // EN 12453 presence detection (from memory, verify)
    const noEye = applyPatch(euSwingGate(), {
      answers: { photoEyeTestReverses: YES },
      entrapment: { devices: euSwingGate().entrapment!.devices.filter((d) => d.type !== 'B1') },
    });
    expect(score(noEye, eu).contradictions?.map((c) => c.id)).toEqual(['sensing.photo-eye-listed']);
  });
});

describe('re-inspection by verdict and usage class', () => {
  // Intervals are data of the version: homes yearly, other classes twice a year; remedy within 90 / 60
  // days; a withdrawn gate when its fixes are reported (common practice, no source)
  it('re-visits a withdrawn gate when the fixes are reported, not on a calendar date', () => {
    const result = score(applyPatch(naSwingGate(), { answers: { controlReachThrough: YES } }), na);
    expect(result.verdict).toBe('withdraw');
    expect(result.reinspection).toEqual({ when: 'fixes_reported' });
  });

  it('follows the usage class for a cleared gate and the remedy interval for one to remedy', () => {
    expect(score(naSwingGate(), na).reinspection).toEqual({ when: 'after_days', afterDays: 365 });
    expect(score(applyPatch(naSwingGate(), { profile: { usageClass: 2 } }), na).reinspection).toEqual({
      when: 'after_days',
      afterDays: 180,
    });
    const remedy = score(applyPatch(naSwingGate(), { answers: { controlLineOfSight: NO } }), na);
    expect(remedy.verdict).toBe('remedy');
    expect(remedy.reinspection).toEqual({ when: 'after_days', afterDays: 90 });
    expect(
      score(applyPatch(euSwingGate(), { answers: { controlLineOfSight: NO } }), eu).reinspection,
    ).toEqual({ when: 'after_days', afterDays: 60 });
  });

  it('says nothing for versions without a plan (their results keep their shape)', () => {
    const result = score(naSwingGate(), shipped('north-american-gate', '2026.1'));
    expect(result).not.toHaveProperty('reinspection');
    expect(result).not.toHaveProperty('contradictions');
  });
});
