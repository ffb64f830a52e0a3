import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { hrnBand } from '@/lib/rules/calculators/hrn';
import { naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, NO, YES } from './support/inputs';
import { shipped } from './support/shipped';

const na = shipped('north-american-gate', '2026.2');
const naBefore = shipped('north-american-gate', '2026.1');

/** The closing photo-eye unmonitored: the 2016 two-means rule fails (critical), the rest of sensing passes. */
const unmonitoredClosingEye = applyPatch(naSwingGate(), {
  entrapment: {
    devices: [
      { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
      { type: 'B1', direction: 'closing', zone: 'closing_edge', monitored: false },
      { type: 'A', direction: 'opening', zone: 'open_side', monitored: true },
      { type: 'B2', direction: 'opening', zone: 'open_side', monitored: true },
    ],
  },
});

describe('an area holding a critical failure', () => {
  it('is capped at the version’s cap, however many lesser rules pass beside it', () => {
    // UL 325 2016 revision (secondary source): an unmonitored photo-eye does not count, so closing has one means
    const before = score(unmonitoredClosingEye, naBefore);
    const after = score(unmonitoredClosingEye, na);
    expect(after.findings.find((f) => f.ruleId === 'sensing.closing-two-means')?.outcome).toBe('fail');
    // 2026.1 read the sensing area as mostly sound beside a critical failure
    expect(before.areaScores.sensing).toBeGreaterThan(50);
    // the cap is data of the version (common practice, no source)
    expect(na.version.scoring.criticalFailureAreaCap).toBe(25);
    expect(after.areaScores.sensing).toBe(25);
  });

  it('leaves an area with only major or minor failures uncapped', () => {
    const result = score(applyPatch(naSwingGate(), { answers: { controlLineOfSight: NO } }), na);
    // controls weights 3+5+3+3+1+1 = 16, line of sight (3) failed → 100 × 13 / 16 = 81
    expect(result.areaScores.controls).toBe(81);
  });
});

describe('default HRN ratings follow severity', () => {
  // Three controls rules with the same worst harm (fatality) at the same gate: critical reach-through,
  // major pedestrian entrance, minor children; likelihood steps by severity (common practice, no source)
  const input = applyPatch(naSwingGate(), {
    answers: { controlReachThrough: YES, pedestrianEntrance: NO, controlsOutOfChildReach: NO },
  });
  const hrnOf = (result: ReturnType<typeof score>, ruleId: string) =>
    result.findings.find((f) => f.ruleId === ruleId)!.hrn!.value;

  it('rates critical above major above minor for the same harm', () => {
    const result = score(input, na);
    expect(hrnOf(result, 'controls.no-reach-through')).toBeGreaterThan(
      hrnOf(result, 'controls.pedestrian-entrance'),
    );
    expect(hrnOf(result, 'controls.pedestrian-entrance')).toBeGreaterThan(hrnOf(result, 'controls.children'));
  });

  it('differs from 2026.1, where a major and a minor finding carried the same HRN', () => {
    const result = score(input, naBefore);
    expect(hrnOf(result, 'controls.pedestrian-entrance')).toBe(hrnOf(result, 'controls.children'));
  });

  it('leaves an auditor’s own likelihood as given', () => {
    const overridden = applyPatch(input, {
      hrnOverrides: { 'controls.children': { lo: 'likely', reason: 'Children play in the driveway.' } },
    });
    expect(score(overridden, na).findings.find((f) => f.ruleId === 'controls.children')!.hrn!.keys.lo).toBe(
      'likely',
    );
  });
});

describe('HRN band edges', () => {
  it('puts a value exactly on an edge in the band the version declares', () => {
    // HRN bands as widely reprinted (secondary source): 10–50 significant, 50–100 high; the edge is the version's choice
    expect(hrnBand(50)).toBe('significant');
    expect(hrnBand(50, undefined, 'lower_inclusive')).toBe('high');
    expect(hrnBand(49.9, undefined, 'lower_inclusive')).toBe('significant');
    expect(hrnBand(1000, undefined, 'lower_inclusive')).toBe('unacceptable');
    expect(hrnBand(0, undefined, 'lower_inclusive')).toBe('negligible');
  });

  it('rates a finding of exactly 50 as high under 2026.2 and significant under 2026.1', () => {
    // LO even chance 5 × FE monthly 1 × DPH loss of two limbs 10 × NP 1–2 people 1 = 50
    const input = applyPatch(naSwingGate(), {
      answers: { placardsLegible: NO },
      hrnOverrides: {
        'signage.placards-legible': {
          lo: 'even_chance',
          fe: 'monthly',
          dph: 'loss_of_two_limbs_or_eyes',
          np: '1_2',
          reason: 'Edge case.',
        },
      },
    });
    const bandIn = (ruleset: typeof na) =>
      score(input, ruleset).findings.find((f) => f.ruleId === 'signage.placards-legible')!.hrn!;
    expect(bandIn(na)).toMatchObject({ value: 50, band: 'high' });
    expect(bandIn(naBefore)).toMatchObject({ value: 50, band: 'significant' });
    expect(na.version.hrn.bandEdges).toBe('lower_inclusive');
  });
});
