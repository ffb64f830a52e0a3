import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, NO, REMOVE, YES } from './support/inputs';
import { shipped } from './support/shipped';

const current = shipped('north-american-gate', '2026.1');

describe('verdict', () => {
  it('says withdraw when any critical rule fails', () => {
    // UL 325 installation instructions: no reaching through the gate to a control (critical here)
    expect(score(applyPatch(naSwingGate(), { answers: { controlReachThrough: YES } }), current).verdict).toBe(
      'withdraw',
    );
  });

  it('says remedy when a major rule fails and nothing critical does', () => {
    expect(
      score(applyPatch(naSwingGate(), { measurements: { controlDistanceMm: len(4, 'ft') } }), current)
        .verdict,
    ).toBe('remedy');
  });

  it('says remedy when a critical rule cannot be checked', () => {
    const result = score(applyPatch(naSwingGate(), { measurements: { reversalStartS: REMOVE } }), current);
    expect(result.verdict).toBe('remedy');
    expect(result.counts.fail).toBe(0);
  });

  it('stays clear when only a major rule needs information, but marks the result incomplete', () => {
    const result = score(applyPatch(naSwingGate(), { measurements: { controlDistanceMm: REMOVE } }), current);
    expect(result.verdict).toBe('clear');
    expect(result.complete).toBe(false);
  });

  it('stays clear when only minor rules fail', () => {
    const result = score(
      applyPatch(naSwingGate(), { answers: { placardsLegible: NO, remoteCodesChanged: NO } }),
      current,
    );
    expect(result.verdict).toBe('clear');
    expect(result.counts.failedBySeverity).toEqual({ critical: 0, major: 0, minor: 2 });
  });
});

describe('area scores', () => {
  // Weights from the ruleset: critical 5, major 3, minor 1. Swing controls rules that apply at
  // this gate: distance 3, reach-through 5, line of sight 3, pedestrian entrance 3, children 1,
  // manual release 1 = 16.
  it('weights each applicable rule by severity', () => {
    const result = score(applyPatch(naSwingGate(), { answers: { controlReachThrough: YES } }), current);
    expect(result.areaScores.controls).toBe(69); // 100 × 11 / 16 = 68.75
  });

  it('counts needs_info as not passed and leaves n/a out', () => {
    const result = score(
      applyPatch(naSwingGate(), {
        answers: { controlReachThrough: YES, manualReleaseSecure: REMOVE },
        site: { childrenOrPetsPresent: false },
      }),
      current,
    );
    // children rule now n/a: weight 15; passed distance 3 + sight 3 + pedestrian 3 = 9 → 60
    expect(result.areaScores.controls).toBe(60);
  });

  it('gives null, not 100, to an area where no rule applies', () => {
    const doc = structuredClone(current.version);
    doc.version = '2026.1-test.1';
    doc.rules = doc.rules.filter((r) => r.area !== 'signage');
    expect(score(naSwingGate(), doc).areaScores.signage).toBeNull();
  });

  it('orders findings by severity, then area order, then rule id', () => {
    const findings = score(naSwingGate(), current).findings;
    const severityRank = { critical: 0, major: 1, minor: 2 };
    const areaRank = new Map(current.version.areas.map((a, i) => [a.key, i]));
    const keys = findings.map((f) => [severityRank[f.severity], areaRank.get(f.area)!, f.ruleId] as const);
    const sorted = [...keys].sort((a, b) => a[0] - b[0] || a[1] - b[1] || (a[2] < b[2] ? -1 : 1));
    expect(keys).toEqual(sorted);
    expect(findings[0]!.severity).toBe('critical');
  });
});
