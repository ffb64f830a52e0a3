import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { naSlideGate } from './fixtures/north-american-gate';
import { applyPatch, len, NO } from './support/inputs';
import { shipped } from './support/shipped';

const postOutcome = (version: string, inches: number) =>
  score(
    applyPatch(naSlideGate(), {
      answers: { postGapGuarded: NO },
      measurements: { postGapMm: len(inches, 'in') },
    }),
    shipped('north-american-gate', version),
  ).findings.find((f) => f.ruleId === 'gaps.slide-post')?.outcome;

describe('slide-gate post gaps (North American 2026.2)', () => {
  it('passes a gap at or above the 16 in zone limit: only gaps under 16 in are entrapment zones', () => {
    // UL 325 slide gates: any gap under 16 in (406.4 mm) is an entrapment zone (secondary source) — 16 in is not
    expect(postOutcome('2026.2', 16)).toBe('pass');
    expect(postOutcome('2026.2', 20)).toBe('pass');
    expect(postOutcome('2026.2', 15.9)).toBe('fail');
    // 2026.1 failed every unguarded gap over the sphere, 16 in and more included
    expect(postOutcome('2026.1', 16)).toBe('fail');
  });

  it('still passes a gap no wider than the 2-1/4 in sphere (inclusive), as before', () => {
    // ASTM F2200 2-1/4 in (57.15 mm) sphere, borrowed for the post gap as common practice
    expect(postOutcome('2026.2', 2.25)).toBe('pass');
    expect(postOutcome('2026.2', 2.3)).toBe('fail');
  });
});
