import { describe, expect, it } from 'vitest';
import { score, type AssessmentInput } from '@/lib/rules';
import { euSlideGate, euSwingGate } from './fixtures/european-powered-gate';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, NO } from './support/inputs';
import { shipped } from './support/shipped';

const na = shipped('north-american-gate', '2026.2');
const naBefore = shipped('north-american-gate', '2026.1');
const eu = shipped('european-powered-gate', '2026.2');

const outcome = (input: AssessmentInput, ruleset: typeof na, ruleId: string) =>
  score(input, ruleset).findings.find((f) => f.ruleId === ruleId)?.outcome;

/** Closing protected (A + monitored photo-eye); opening: the operator's own sensing and `openingExtra`. */
type Devices = NonNullable<AssessmentInput['entrapment']>['devices'];
const swingDevices = (openingExtra: Devices): NonNullable<AssessmentInput['entrapment']> => ({
  zones: [{ zone: 'closing_edge', direction: 'closing' }],
  devices: [
    { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
    { type: 'B1', direction: 'closing', zone: 'closing_edge', monitored: true },
    { type: 'A', direction: 'opening', zone: 'open_side', monitored: true },
    ...openingExtra,
  ],
});

describe('a remedied fixed-object zone clears (North American swing gates)', () => {
  // ASTM F2200 swing gates (secondary source): the open leaf stays at least 16 in (406.4 mm) from fixed
  // objects; UL 325 2016 revision (secondary source): a monitored external device protects a zone.
  const near = (devices: Parameters<typeof swingDevices>[0]) =>
    applyPatch(naSwingGate(), {
      measurements: { fixedObjectClearanceMm: len(10, 'in') },
      entrapment: swingDevices(devices),
    });

  it('passes a leaf 10 in from a wall once a monitored edge protects the open side while opening', () => {
    const input = near([{ type: 'B2', direction: 'opening', zone: 'open_side', monitored: true }]);
    expect(outcome(input, na, 'pinch.fixed-objects')).toBe('pass');
    const result = score(input, na);
    expect(result.verdict).not.toBe('withdraw');
    // the same remedy under 2026.1: still failed on the distance alone
    expect(outcome(input, naBefore, 'pinch.fixed-objects')).toBe('fail');
    expect(score(input, naBefore).verdict).toBe('withdraw');
  });

  it('also accepts a monitored photo-eye, but not an unmonitored one, nor one watching the closing direction', () => {
    // UL 325 2016 revision: external devices count only when monitored every cycle (secondary source)
    expect(
      outcome(
        near([{ type: 'B1', direction: 'opening', zone: 'open_side', monitored: true }]),
        na,
        'pinch.fixed-objects',
      ),
    ).toBe('pass');
    expect(
      outcome(
        near([{ type: 'B1', direction: 'opening', zone: 'open_side', monitored: false }]),
        na,
        'pinch.fixed-objects',
      ),
    ).toBe('fail');
    expect(
      outcome(
        near([{ type: 'B2', direction: 'closing', zone: 'open_side', monitored: true }]),
        na,
        'pinch.fixed-objects',
      ),
    ).toBe('fail');
    expect(
      outcome(
        near([{ type: 'B2', direction: 'opening', zone: 'hinge_side', monitored: true }]),
        na,
        'pinch.fixed-objects',
      ),
    ).toBe('fail');
  });

  it('keeps 16 in exactly as enough clearance without any device (inclusive limit)', () => {
    // ASTM F2200: "at least 16 in" — 406.4 mm passes, 15.9 in fails (secondary source)
    const at = (inches: number) =>
      applyPatch(naSwingGate(), {
        measurements: { fixedObjectClearanceMm: len(inches, 'in') },
        entrapment: swingDevices([]),
      });
    expect(outcome(at(16), na, 'pinch.fixed-objects')).toBe('pass');
    expect(outcome(at(15.9), na, 'pinch.fixed-objects')).toBe('fail');
  });
});

describe('zones implied by measurements', () => {
  it('treats a fixed object under 16 in as an opening-direction zone the auditor did not list, and asks for its protection', () => {
    // ASTM F2200 / UL 325 (secondary source): under 16 in from a fixed object is an entrapment zone while opening.
    // The auditor listed only the closing edge and fitted nothing for opening.
    const input = applyPatch(naSwingGate(), {
      measurements: { fixedObjectClearanceMm: len(12, 'in') },
      entrapment: {
        zones: [{ zone: 'closing_edge', direction: 'closing' }],
        devices: swingDevices([]).devices.filter((d) => d.direction === 'closing'),
      },
    });
    const result = score(input, na);
    // UL 325 2016 revision: two independent means in each direction with a zone
    expect(result.findings.find((f) => f.ruleId === 'sensing.opening-two-means')).toMatchObject({
      outcome: 'fail',
      observed: { 'calc.entrapment.opening.compliant2016': false },
    });
    expect(outcome(input, na, 'sensing.zones-watched')).toBe('fail');
    // 2026.1 did not see the zone: the opening direction passed with nothing fitted
    expect(outcome(input, naBefore, 'sensing.opening-two-means')).toBe('pass');
  });

  it('derives nothing from a clearance at or over the limit', () => {
    const input = applyPatch(naSwingGate(), {
      measurements: { fixedObjectClearanceMm: len(16, 'in') },
      entrapment: {
        zones: [{ zone: 'closing_edge', direction: 'closing' }],
        devices: swingDevices([]).devices.filter((d) => d.direction === 'closing'),
      },
    });
    expect(outcome(input, na, 'sensing.opening-two-means')).toBe('pass');
  });

  it('treats a swing-gate bottom gap over 4 in and under 16 in as a zone in both directions', () => {
    // UL 325 swing-gate entrapment zone: bottom gap over 4 in and under 16 in (secondary source)
    const input = applyPatch(naSwingGate(), { measurements: { bottomGapMm: len(8, 'in') } });
    const result = score(input, na);
    expect(result.findings.find((f) => f.ruleId === 'sensing.zones-watched')?.observed).toMatchObject({
      'calc.entrapment.zonesWithoutExternalSensor': 2,
    });
    // exactly 4 in is not a zone (UL 325 says "over 4 in")
    const atFour = score(applyPatch(naSwingGate(), { measurements: { bottomGapMm: len(4, 'in') } }), na);
    expect(atFour.findings.find((f) => f.ruleId === 'sensing.zones-watched')?.outcome).toBe('pass');
  });

  it('treats a slide-gate post gap under 16 in as an opening zone', () => {
    // UL 325 slide gates: any gap under 16 in is an entrapment zone (secondary source); direction from memory, verify
    const input = applyPatch(naSlideGate(), {
      measurements: { postGapMm: len(10, 'in') },
      entrapment: {
        zones: [{ zone: 'closing_edge', direction: 'closing' }],
        devices: naSlideGate().entrapment!.devices.filter((d) => d.direction === 'closing'),
      },
    });
    expect(outcome(input, na, 'sensing.opening-two-means')).toBe('fail');
    expect(outcome(input, naBefore, 'sensing.opening-two-means')).toBe('pass');
  });

  it('does the same in the European family: a fixed object nearer than 500 mm makes the opening direction need protection', () => {
    // EN ISO 13854 body 500 mm (secondary source); EN 12453 hazard zones on the opening travel (from memory, verify)
    const base = euSwingGate();
    const closingOnly = {
      zones: [{ zone: 'closing_edge' as const, direction: 'closing' as const }],
      devices: base.entrapment!.devices.filter((d) => d.direction === 'closing'),
    };
    const input = applyPatch(base, {
      measurements: { fixedObjectClearanceMm: len(450) },
      answers: { openingSideForceTested: NO },
      entrapment: closingOnly,
    });
    expect(outcome(input, eu, 'sensing.opening-protected')).toBe('fail');
    expect(outcome(input, shipped('european-powered-gate', '2026.1'), 'sensing.opening-protected')).toBe(
      'n/a',
    );
    // a slide gate's open end nearer than 500 mm likewise
    const slide = euSlideGate();
    const slideInput = applyPatch(slide, {
      measurements: { slideOpenEndClearanceMm: len(300) },
      answers: { openingSideForceTested: NO },
      entrapment: {
        zones: [{ zone: 'closing_edge', direction: 'closing' }],
        devices: slide.entrapment!.devices.filter((d) => d.direction === 'closing'),
      },
    });
    expect(outcome(slideInput, eu, 'sensing.opening-protected')).toBe('fail');
  });
});
