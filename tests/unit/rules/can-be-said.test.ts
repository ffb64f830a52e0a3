import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { unitsFor, toMeasurement } from '@/lib/walk/entry';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, NO, REMOVE } from './support/inputs';
import { shipped } from './support/shipped';

const na = shipped('north-american-gate', '2026.2');
const naBefore = shipped('north-american-gate', '2026.1');
const finding = (result: ReturnType<typeof score>, ruleId: string) =>
  result.findings.find((f) => f.ruleId === ruleId)!;

describe('a measured operator-to-leaf clearance instead of the full ram layout', () => {
  // common practice, no source: operator body at least 2 in (50.8 mm) from the leaf, inclusive
  const measured = (inches: number) =>
    applyPatch(naSwingGate(), {
      swingGeometry: REMOVE,
      measurements: { operatorLeafClearanceMm: len(inches, 'in') },
    });

  it('judges the measured clearance when no layout was entered', () => {
    expect(finding(score(measured(2), na), 'pinch.operator-arm').outcome).toBe('pass');
    expect(finding(score(measured(1.5), na), 'pinch.operator-arm').outcome).toBe('fail');
    // 2026.1 could only ask for the layout
    expect(finding(score(measured(2), naBefore), 'pinch.operator-arm').outcome).toBe('needs_info');
  });

  it('takes the tighter of the two when both are known', () => {
    // the base layout clears the leaf by about 103 mm (swing-geometry calculator); 1 in measured on site wins
    const both = applyPatch(naSwingGate(), { measurements: { operatorLeafClearanceMm: len(1, 'in') } });
    expect(finding(score(both, na), 'pinch.operator-arm')).toMatchObject({
      outcome: 'fail',
      observed: { 'calc.geometry.operatorLeafClearanceMm': 25.4 },
    });
  });

  it('asks for the measurement by its own prompt when neither is known', () => {
    const result = score(applyPatch(naSwingGate(), { swingGeometry: REMOVE }), na);
    expect(finding(result, 'pinch.operator-arm')).toMatchObject({
      outcome: 'needs_info',
      missing: [{ key: 'm.operatorLeafClearanceMm' }],
    });
  });
});

describe('the height of exposed rollers on a slide gate', () => {
  // ASTM F2200 slide gates: exposed weight-bearing rollers up to 8 ft (2438.4 mm) guarded (secondary source)
  const rollers = (feet: number) =>
    applyPatch(naSlideGate(), {
      answers: { rollersGuarded: NO },
      measurements: { rollersExposedHeightMm: len(feet, 'ft') },
    });

  it('passes unguarded rollers only above 8 ft (a roller exactly at 8 ft needs its guard)', () => {
    expect(finding(score(rollers(9), na), 'build.slide-roller-guards').outcome).toBe('pass');
    expect(finding(score(rollers(8), na), 'build.slide-roller-guards').outcome).toBe('fail');
    expect(finding(score(rollers(9), naBefore), 'build.slide-roller-guards').outcome).toBe('fail');
  });
});

describe('wire runs in feet, and the drop in volts', () => {
  it('offers feet and metres for the low-voltage run, in the organisation’s order', () => {
    const question = na.version.questions.find((q) => q.key === 'lowVoltageRunMm')!;
    expect(unitsFor('length', 'imperial', question.entryUnits)).toEqual(['ft', 'm']);
    expect(unitsFor('length', 'metric', question.entryUnits)).toEqual(['m', 'ft']);
    // other lengths keep inches and millimetres
    expect(unitsFor('length', 'imperial')).toEqual(['in', 'mm']);
    // 1 ft = 304.8 mm exactly (NIST SP 811)
    expect(toMeasurement('length', 100, 'ft')).toEqual({ value: 100, unit: 'ft', canonical: 30480 });
  });

  it('shows the drop in volts beside the percentage in the finding', () => {
    // NEC Chapter 9 Table 8: AWG 18 stranded 7.95 Ω/1000 ft; 100 ft one way, 5 A → 2 × 5 × 100 × 7.95 / 1000 = 7.95 V of 24 V
    const input = applyPatch(naSwingGate(), {
      answers: { wireGaugeAwg: { value: 'awg18' } },
      measurements: {
        lowVoltageRunMm: len(100, 'ft'),
        operatorCurrentA: { value: 5, unit: 'A', canonical: 5 },
      },
    });
    expect(finding(score(input, na), 'power.voltage-drop')).toMatchObject({
      outcome: 'fail',
      observed: { 'calc.power.dropPercent': 33.13, 'calc.power.dropV': 7.95 },
    });
    expect(finding(score(input, naBefore), 'power.voltage-drop').observed).not.toHaveProperty(
      'calc.power.dropV',
    );
  });
});
