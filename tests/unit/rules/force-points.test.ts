import { describe, expect, it } from 'vitest';
import { score, type ForceTest } from '@/lib/rules';
import { euSlideGate } from './fixtures/european-powered-gate';
import { applyPatch } from './support/inputs';
import { shipped } from './support/shipped';

const eu = shipped('european-powered-gate', '2026.2');

const summaryAt = (gapMm: number, peakN = 300): ForceTest => ({
  location: 'closing_edge',
  direction: 'closing',
  gapMm,
  summary: { peakN, durationAbove150S: 0.4, staticN: 90, residualAt5sN: 10 },
});
/** A trace sampled at 100 Hz: EN 12445 5.1.1 asks for at least 200 Hz (secondary source), so it is refused. */
const slowTraceAt = (gapMm: number): ForceTest => ({
  location: 'closing_edge',
  direction: 'closing',
  gapMm,
  samples: Array.from({ length: 700 }, (_, i) => ({ t: i / 100, f: i > 10 && i < 30 ? 200 : 0 })),
});

const withTests = (tests: ForceTest[]) => applyPatch(euSlideGate(), { forceTests: tests });
const finding = (result: ReturnType<typeof score>, ruleId: string) =>
  result.findings.find((f) => f.ruleId === ruleId);

describe('refused force traces and the EN 12445 measuring points (European 2026.2)', () => {
  it('leaves the point of a refused trace needing information: the gate cannot score complete', () => {
    // EN 12445 points 50, 300, 500 mm (secondary source); the 300 mm point has only a refused trace
    const result = score(withTests([summaryAt(50), slowTraceAt(300), summaryAt(500)]), eu);
    expect(result.evidenceProblems.map((p) => p.path)).toEqual(['forceTests[1]']);
    expect(result.complete).toBe(false);
    // EN 12453 400 N at 50–500 mm: the worst peak there is unknown while one point is unmeasured
    expect(finding(result, 'force.peak-small-gap')?.outcome).toBe('needs_info');
    expect(finding(result, 'force.static')?.outcome).toBe('needs_info');
    expect(result.verdict).not.toBe('clear');
  });

  it('asks for the large-gap peak whenever a test over 500 mm was submitted, even a refused one', () => {
    // EN 12453 1400 N over 500 mm (sliding and hinged gates; secondary source)
    const tests = [summaryAt(50), summaryAt(300), summaryAt(500), slowTraceAt(1000)];
    const result = score(withTests(tests), eu);
    expect(finding(result, 'force.peak-large-gap')).toMatchObject({ outcome: 'needs_info' });
    expect(result.complete).toBe(false);
    expect(result.verdict).not.toBe('clear');
    // 2026.1 let the same gate clear, complete, with only the minor refused-trace finding
    const before = score(withTests(tests), shipped('european-powered-gate', '2026.1'));
    expect(finding(before, 'force.peak-large-gap')?.outcome).toBe('pass');
  });

  it('does not apply the large-gap rule when no test over 500 mm was submitted (exactly 500 mm is the small-gap zone)', () => {
    // EN 12453: 50–500 mm inclusive is the 400 N zone (secondary source)
    const result = score(withTests([summaryAt(50), summaryAt(300), summaryAt(500)]), eu);
    expect(finding(result, 'force.peak-large-gap')?.outcome).toBe('n/a');
    expect(result.complete).toBe(true);
    expect(result.verdict).toBe('clear');
  });

  it('checks each required point has an accepted test, not just that three tests were made', () => {
    // EN 12445 measuring points 50, 300 and 500 mm (secondary source): two tests at 300 mm leave 500 mm unmeasured
    const tests = [summaryAt(50), summaryAt(300), summaryAt(300, 320)];
    expect(finding(score(withTests(tests), eu), 'force.measuring-points')?.outcome).toBe('fail');
    expect(
      finding(score(withTests(tests), shipped('european-powered-gate', '2026.1')), 'force.measuring-points')
        ?.outcome,
    ).toBe('pass');
    // a refused trace does not count for its point
    expect(
      finding(
        score(withTests([summaryAt(50), slowTraceAt(300), summaryAt(500), summaryAt(1000, 900)]), eu),
        'force.measuring-points',
      )?.outcome,
    ).toBe('fail');
  });

  it('accepts a point measured again after a refused trace', () => {
    const result = score(withTests([summaryAt(50), slowTraceAt(300), summaryAt(300), summaryAt(500)]), eu);
    expect(finding(result, 'force.peak-small-gap')?.outcome).toBe('pass');
    expect(finding(result, 'force.measuring-points')?.outcome).toBe('pass');
    // the refused trace is still reported (EN 12445 5.1.1, at least 200 Hz)
    expect(finding(result, 'force.traces-accepted')?.outcome).toBe('fail');
  });
});
