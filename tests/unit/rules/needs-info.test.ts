import { describe, expect, it } from 'vitest';
import { score, type Finding } from '@/lib/rules';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, NA, REMOVE } from './support/inputs';
import { shipped } from './support/shipped';

const current = shipped('north-american-gate', '2026.1');
const findingOf = (findings: Finding[], id: string) => findings.find((f) => f.ruleId === id)!;

describe('needs information', () => {
  it('names a missing measurement with its prompt and lists it once for the whole assessment', () => {
    const input = applyPatch(naSwingGate(), { measurements: { fixedObjectClearanceMm: REMOVE } });
    const result = score(input, current);
    const finding = findingOf(result.findings, 'pinch.fixed-objects');
    expect(finding.outcome).toBe('needs_info');
    expect(finding.missing).toEqual([
      {
        key: 'm.fixedObjectClearanceMm',
        prompt:
          'Elsewhere along the swing, what is the smallest distance between the gate and any fixed object (wall, pillar, tree)?',
      },
    ]);
    expect(result.needsInfo).toEqual([{ ...finding.missing[0], ruleIds: ['pinch.fixed-objects'] }]);
    expect(result.complete).toBe(false);
  });

  it('traces a missing calculator fact back to the unanswered question it needs', () => {
    const result = score(applyPatch(naSwingGate(), { measurements: { operatorCurrentA: REMOVE } }), current);
    expect(findingOf(result.findings, 'power.voltage-drop').missing.map((m) => m.key)).toEqual([
      'm.operatorCurrentA',
    ]);
  });

  it('asks for the entrapment devices when none were recorded', () => {
    const result = score(applyPatch(naSwingGate(), { entrapment: REMOVE }), current);
    const finding = findingOf(result.findings, 'sensing.no-constant-pressure-with-auto-close');
    expect(finding.outcome).toBe('needs_info');
    expect(finding.missing[0]!.prompt).toBe(
      'Entrapment zones and the protection devices fitted, per direction of travel',
    );
  });

  it('asks for the operator date when it decides which protection rules apply', () => {
    // UL 325: the 2016 rules bind operators made from 12 Jan 2016 (secondary source)
    const result = score(applyPatch(naSwingGate(), { profile: { operatorManufacturedOn: REMOVE } }), current);
    const finding = findingOf(result.findings, 'sensing.closing-two-means');
    expect(finding.outcome).toBe('needs_info');
    expect(finding.missing).toEqual([
      {
        key: 'calc.entrapment.rules2016',
        prompt: "Operator's date of manufacture, or the UL 325 edition it is listed to",
      },
    ]);
    // A critical rule that cannot be checked holds the verdict at remedy.
    expect(result.verdict).toBe('remedy');
  });

  it('asks for the leaf weight before judging a slide gate speed', () => {
    const result = score(applyPatch(naSlideGate(), { profile: { leafWeight: REMOVE } }), current);
    expect(findingOf(result.findings, 'force.speed')).toMatchObject({
      outcome: 'needs_info',
      missing: [{ key: 'profile.leafWeightKg', prompt: 'Leaf weight' }],
    });
  });

  it('treats a required answer of n/a as a rule that does not apply here', () => {
    const result = score(applyPatch(naSlideGate(), { answers: { edgeTestReverses: NA } }), current);
    expect(findingOf(result.findings, 'sensing.edge-works').outcome).toBe('n/a');
  });

  it('still judges the slide screen height without the leaf height, which is optional there', () => {
    // ASTM F2200: 72 in or the top of the gate if lower (secondary source)
    const result = score(applyPatch(naSlideGate(), { profile: { leafHeight: REMOVE } }), current);
    expect(findingOf(result.findings, 'gaps.slide-screen-height').outcome).toBe('pass');
  });

  it('reports a refused force trace as an evidence problem with its input path', () => {
    const eu = shipped('european-powered-gate', '2026.1');
    const input = applyPatch(naSlideGate(), {});
    input.forceTests = [
      {
        location: 'closing_edge',
        direction: 'closing',
        gapMm: 300,
        samples: [
          { t: 0, f: 0 },
          { t: 0.5, f: 100 },
        ],
      },
    ];
    const result = score(input, eu);
    // EN 12445 5.1.1: the meter samples at 200 Hz or faster
    expect(result.evidenceProblems).toEqual([
      {
        path: 'forceTests[0]',
        code: 'sample_rate_too_low',
        message: expect.stringContaining('200 Hz') as unknown as string,
      },
    ]);
    expect(findingOf(result.findings, 'force.traces-accepted').outcome).toBe('fail');
  });
});
