import { describe, expect, it } from 'vitest';
import { score, type ForceTest } from '@/lib/rules';
import { euSlideGate } from './fixtures/european-powered-gate';
import { applyPatch, len } from './support/inputs';
import { shipped } from './support/shipped';

/**
 * A force trace drawn by hand, sampled at 200 Hz for 6 s: nothing until 0.1 s, a straight rise
 * to 520 N at 0.3 s, a straight fall to 100 N at 0.6 s, held to 1.0 s, then down to 0 at 2.0 s.
 */
function handDrawnTrace(): ForceTest['samples'] {
  const force = (t: number) =>
    t < 0.1
      ? 0
      : t <= 0.3
        ? (520 * (t - 0.1)) / 0.2
        : t <= 0.6
          ? 520 - (420 * (t - 0.3)) / 0.3
          : t <= 1
            ? 100
            : t <= 2
              ? 100 * (2 - t)
              : 0;
  return Array.from({ length: 1201 }, (_, i) => ({
    t: i / 200,
    f: Math.round(force(i / 200) * 1000) / 1000,
  }));
}

// A domestic slide gate with automatic closing, checked by hand against european-powered-gate
// 2026.1: the 300 mm measuring point pushes 520 N, the photo beam sits at 750 mm and the gate
// runs 12 mm from its post.
const gate = applyPatch(euSlideGate(), {
  measurements: { photoBeamHeightMm: len(750), postGapMm: len(12) },
  forceTests: [
    {
      location: 'closing_edge',
      direction: 'closing',
      gapMm: 50,
      summary: { peakN: 310, durationAbove150S: 0.3, staticN: 80, residualAt5sN: 5 },
    },
    { location: 'closing_edge', direction: 'closing', gapMm: 300, samples: handDrawnTrace() },
    {
      location: 'closing_edge',
      direction: 'closing',
      gapMm: 500,
      summary: { peakN: 360, durationAbove150S: 0.35, staticN: 90, residualAt5sN: 8 },
    },
  ],
});

describe('worked example: domestic slide gate (European family)', () => {
  const result = score(gate, shipped('european-powered-gate', '2026.1'));
  const finding = (id: string) => result.findings.find((f) => f.ruleId === id)!;

  it('reads the hand-drawn trace as a 520 N peak that breaks the 400 N limit', () => {
    // EN 12453 (secondary source): at most 400 N for gaps of 50–500 mm
    expect(finding('force.peak-small-gap')).toMatchObject({
      outcome: 'fail',
      observed: { 'calc.force.smallGapMaxPeakN': 520 },
    });
  });

  it('keeps the rest of the trace within the limits', () => {
    // Above 150 N from 0.1577 s (rise) to 0.5643 s (fall) = 0.407 s ≤ 0.75 s
    expect(finding('force.dynamic-duration')).toMatchObject({
      outcome: 'pass',
      observed: { 'calc.force.worst.durationAbove150S': 0.407 },
    });
    // Largest force after the dynamic period: the 0.565 s sample, 520 − 420 × 0.265 / 0.3 = 149 N ≤ 150 N
    expect(finding('force.static')).toMatchObject({
      outcome: 'pass',
      observed: { 'calc.force.worst.staticN': 149 },
    });
    // 5 s after first contact (0.11 s) the trace is at 0 N ≤ 25 N; the summaries' worst is 8 N
    expect(finding('force.residual')).toMatchObject({
      outcome: 'pass',
      observed: { 'calc.force.worst.residualAt5sN': 8 },
    });
  });

  it('passes the wide-gap limit when no wide-gap point was measured', () => {
    expect(finding('force.peak-large-gap')).toMatchObject({
      outcome: 'pass',
      observed: { 'calc.force.testCount': 3 },
    });
  });

  it('fails the photo beam height and the post gap', () => {
    // DHF TS 011 (secondary source): beam 300–700 mm; solid slide gate at most 8 mm from its post
    expect(finding('sensing.photo-beam-height').outcome).toBe('fail');
    expect(finding('gaps.slide-post')).toMatchObject({
      outcome: 'fail',
      observed: { 'm.postGapMm': 12 },
      params: { maxPostGapMm: { value: 8, unit: 'mm' } },
    });
  });

  it('withdraws the gate and rates the force hazard HRN 56.25, high', () => {
    // No aggravating site facts: LO unlikely 1.5; class I daily 2.5; DPH fatality 15; NP 1 → 56.25 (50–100 high)
    expect(result.verdict).toBe('withdraw');
    expect(finding('force.peak-small-gap').hrn).toMatchObject({ value: 56.25, band: 'high' });
    // major fracture 4 → 15 (significant); loss of one limb 6 → 22.5 (significant)
    expect(finding('sensing.photo-beam-height').hrn).toMatchObject({ value: 15, band: 'significant' });
    expect(finding('gaps.slide-post').hrn).toMatchObject({ value: 22.5, band: 'significant' });
  });

  it('scores the areas by hand', () => {
    // force: peak 5 ✗, wide gap 5, duration 5, static 5, residual 5, points 3, traces 1, meter 3 ✓ → 27/32 = 84.4
    // gaps: openings at post 5 ✓, post gap 3 ✗ → 5/8 = 62.5 (rounds half up)
    // sensing: presence 5, opening 3, monitored 5, beam height 3 ✗, distance 3, beam works 5, edge works 5 → 26/29 = 89.7
    expect(result.areaScores).toMatchObject({ force: 84, gaps: 63, sensing: 90, pinch: 100, build: 100 });
    expect(result.evidenceProblems).toEqual([]);
    expect(result.complete).toBe(true);
  });
});
