import { describe, expect, it } from 'vitest';
import { diffRulesets, score } from '@/lib/rules';
import { naSlideGate } from './fixtures/north-american-gate';
import { applyPatch, len } from './support/inputs';
import { shipped } from './support/shipped';

const older = shipped('north-american-gate', '2015.1').version;
const current = shipped('north-american-gate', '2026.1').version;

describe('diffRulesets', () => {
  const diff = diffRulesets(older, current);

  it('lists the entrapment rules the 2016 revision replaced', () => {
    expect(diff.rules.removed.map((r) => r.id)).toEqual([
      'sensing.closing-primary-secondary',
      'sensing.opening-primary-secondary',
    ]);
    expect(diff.rules.added.map((r) => r.id)).toEqual([
      'sensing.closing-legacy',
      'sensing.closing-two-means',
      'sensing.external-monitored',
      'sensing.opening-legacy',
      'sensing.opening-two-means',
      'sensing.upgrade-to-current',
      'sensing.zones-watched',
    ]);
  });

  it('reports a changed threshold by param name with both values', () => {
    // ASTM F2200: slide-gate screening 48 in in older editions, 72 in now (secondary source)
    const screen = diff.rules.changed.find((c) => c.id === 'gaps.slide-screen-height');
    expect(screen?.changes).toContainEqual({ field: 'params.screenHeightMm', from: 1219.2, to: 1828.8 });
    expect(screen?.changes).toContainEqual({
      field: 'params.screenHeightMm.note',
      from: '48 in',
      to: '72 in',
    });
  });

  it('reports a severity change and a rule turned off in an amendment', () => {
    const amended = structuredClone(current);
    amended.version = '2026.1-local.1';
    const gap = amended.rules.find((r) => r.id === 'gaps.slide-post')!;
    gap.severity = 'critical';
    gap.params.maxPostGapMm = { value: 50, unit: 'mm' };
    amended.rules.find((r) => r.id === 'handover.remote-codes')!.enabled = false;
    const local = diffRulesets(current, amended);
    expect(local.rules.changed).toEqual([
      {
        id: 'gaps.slide-post',
        title: 'Gap at the post closed or guarded',
        changes: [
          { field: 'params.maxPostGapMm', from: 57.15, to: 50 },
          { field: 'params.maxPostGapMm.note', from: '2-1/4 in', to: null },
          { field: 'severity', from: 'major', to: 'critical' },
        ],
      },
      {
        id: 'handover.remote-codes',
        title: 'Remote codes changed from the factory setting',
        changes: [{ field: 'enabled', from: true, to: false }],
      },
    ]);
    expect(local.version).toEqual([]);
    expect(local.to.version).toBe('2026.1-local.1');
  });

  it('lists changed question prompts and version-level fields', () => {
    expect(diff.questions.changed.map((q) => q.id)).toContain('largestOpeningMm');
    expect(diff.version.map((c) => c.field)).toContain('effectiveFrom');
  });

  it('finds nothing between a version and itself', () => {
    const same = diffRulesets(current, structuredClone(current));
    expect([
      same.rules.added,
      same.rules.removed,
      same.rules.changed,
      same.questions.changed,
      same.version,
    ]).toEqual([[], [], [], [], []]);
  });
});

describe('ruleset impact between versions', () => {
  it('a slide gate screened to 60 in clears the 2015 version and needs remedy under 2026', () => {
    // ASTM F2200: 48 in (older editions) versus 72 in (current), secondary source
    const gate = applyPatch(naSlideGate(), { measurements: { openingsGuardedToMm: len(60, 'in') } });
    expect(score(gate, shipped('north-american-gate', '2015.1')).verdict).toBe('clear');
    expect(score(gate, shipped('north-american-gate', '2026.1')).verdict).toBe('remedy');
  });

  it('a pre-2016 slide gate with unmonitored photo-eyes clears 2015 and needs remedy under 2026', () => {
    // UL 325 Table 30A.1 (pre-2016, A + B1) versus the 2016 monitored-device rule, secondary source
    const gate = applyPatch(naSlideGate(), {
      profile: { operatorManufacturedOn: '2013-04-01' },
      entrapment: {
        devices: [
          { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
          { type: 'B1', direction: 'closing', zone: 'closing_edge', monitored: false },
          { type: 'A', direction: 'opening', zone: 'post_gap', monitored: true },
          { type: 'B1', direction: 'opening', zone: 'post_gap', monitored: false },
        ],
      },
    });
    expect(score(gate, shipped('north-american-gate', '2015.1')).verdict).toBe('clear');
    const now = score(gate, shipped('north-american-gate', '2026.1'));
    expect(now.verdict).toBe('remedy');
    expect(now.findings.find((f) => f.ruleId === 'sensing.upgrade-to-current')?.outcome).toBe('fail');
  });
});
