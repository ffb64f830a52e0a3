import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { naSwingGate } from './fixtures/north-american-gate';
import { amps, applyPatch, choice, count, len, NO, REMOVE } from './support/inputs';
import { shipped } from './support/shipped';

// A residential swing gate on level ground, children and walkers about, checked by hand against
// north-american-gate 2026.1: a finger trap at the hinge, a wall 12 in from the swinging leaf,
// one placard missing, thin wire on a long run, and the reversal travel not measured.
const gate = applyPatch(naSwingGate(), {
  site: { slopeAcrossSwing: false },
  answers: { objectBehindOpenGate: NO, wireGaugeAwg: choice('awg16'), wireConductor: choice('solid') },
  measurements: {
    hingeGapMm: len(12),
    fixedObjectClearanceMm: len(12, 'in'),
    placardsSide2: count(0),
    reversalTravelMm: REMOVE,
    lowVoltageRunMm: len(150, 'ft'),
    operatorCurrentA: amps(3),
  },
});

describe('worked example: residential swing gate', () => {
  const result = score(gate, shipped('north-american-gate', '2026.1'));
  const finding = (id: string) => result.findings.find((f) => f.ruleId === id)!;

  it('fails exactly the four rules the walk found wrong', () => {
    // Critical first, then majors in the version's area order (pinch before signage), then minor.
    expect(result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId)).toEqual([
      'pinch.fixed-objects',
      'pinch.hinge-side',
      'signage.placards-each-side',
      'power.voltage-drop',
    ]);
  });

  it('withdraws the gate: a critical rule fails', () => {
    // ASTM F2200: at least 16 in (406.4 mm) from fixed objects; 12 in = 304.8 mm
    expect(finding('pinch.fixed-objects').observed).toEqual({ 'm.fixedObjectClearanceMm': 304.8 });
    expect(result.verdict).toBe('withdraw');
  });

  it('rates the fixed-object hazard HRN 300, very high', () => {
    // LO: unlikely + 2 steps (children, pedestrians) = even chance 5; FE: class I daily + 1 step
    // (pedestrians) = hourly 4; DPH fatality 15; NP 1–2 people 1 → 5 × 4 × 15 × 1 = 300 (100–500 very high)
    expect(finding('pinch.fixed-objects').hrn).toEqual({
      lo: 5,
      fe: 4,
      dph: 15,
      np: 1,
      value: 300,
      band: 'very_high',
      keys: { lo: 'even_chance', fe: 'hourly', dph: 'fatality', np: '1_2' },
    });
    // DPH loss of one limb 6 → 120, very high; placards major fracture 4 → 80, high; wiring bruise 0.1 → 2, very low
    expect(finding('pinch.hinge-side').hrn?.value).toBe(120);
    expect(finding('signage.placards-each-side').hrn).toMatchObject({ value: 80, band: 'high' });
    expect(finding('power.voltage-drop').hrn).toMatchObject({ value: 2, band: 'very_low' });
  });

  it('works out the voltage drop from the wire table', () => {
    // NEC Chapter 9 Table 8: AWG 16 solid 4.89 Ω/1000 ft. 2 × 150 ft × 4.89 / 1000 = 1.467 Ω;
    // × 3 A = 4.401 V; ÷ 24 V = 18.34 % (limit 5 %, common practice)
    expect(finding('power.voltage-drop').observed).toEqual({ 'calc.power.dropPercent': 18.34 });
  });

  it('asks for the reversal travel it could not judge', () => {
    expect(result.needsInfo).toEqual([
      {
        key: 'm.reversalTravelMm',
        prompt: 'After reversing, how far does the gate travel back?',
        ruleIds: ['force.reversal-travel'],
      },
    ]);
    expect(result.complete).toBe(false);
  });

  it('scores the areas by hand', () => {
    // pinch: hinge 3 ✗, closing edge 3 ✓, operator clearance 3 ✓, arm joints 1 ✓, fixed objects 5 ✗ → 7/15 = 46.7
    // force: reversal time 5 ✓, travel 5 (needs info), second contact 3 ✓ → 8/13 = 61.5
    // signage: placards 3 ✗, legible 1 ✓ → 1/4 = 25
    // power: drop 1 ✗ of 1+3+1+1+1+1+1+3 = 12 → 11/12 = 91.7
    expect(result.areaScores).toEqual({
      pinch: 47,
      gaps: 100,
      signage: 25,
      force: 62,
      sensing: 100,
      controls: 100,
      build: 100,
      power: 92,
      handover: 100,
    });
  });

  it('counts every outcome', () => {
    // 60 rules: 12 slide-only or conditional rules n/a, plus the covered-object rule (nothing
    // behind the open leaf) and the slope rule (level ground) → 14 n/a; 4 fail; 1 needs info; 41 pass
    expect(result.counts).toEqual({
      pass: 41,
      fail: 4,
      na: 14,
      needsInfo: 1,
      failedBySeverity: { critical: 1, major: 2, minor: 1 },
    });
  });
});
