/**
 * entrapmentVerdicts (what the entrapment facts read, worked out with type masks) against the
 * full judgement of assessEntrapmentProtection, over every gate kind, usage class and automatic
 * closing setting with thousands of seeded device and zone combinations, and each single device.
 */
import { describe, expect, it } from 'vitest';
import {
  assessEntrapmentProtection,
  entrapmentVerdicts,
  type DirectedDevice,
  type TravelDirection,
} from '@/lib/rules/calculators/entrapment-protection';
import { ENTRAPMENT_DEVICE_TYPES } from '@/lib/rules/calculators/ul325-entrapment-types';
import { GATE_KINDS } from '@/lib/rules/vocabulary';
import { createPrng } from '../rules/support/prng';

const DIRECTIONS: TravelDirection[] = ['opening', 'closing'];

function compare(
  gateKind: (typeof GATE_KINDS)[number],
  usageClass: 1 | 2 | 3 | 4,
  automaticClosing: boolean,
  devices: DirectedDevice[],
  entrapmentZones: Record<TravelDirection, boolean>,
) {
  const full = assessEntrapmentProtection({
    gateKind,
    usageClass,
    automaticClosing,
    manufacturedOn: null,
    edition: null,
    entrapmentZones,
    devices: {
      opening: devices.filter((d) => d.direction === 'opening'),
      closing: devices.filter((d) => d.direction === 'closing'),
    },
  });
  for (const direction of DIRECTIONS) {
    const lean = entrapmentVerdicts(
      { gateKind, usageClass, automaticClosing, devices, entrapmentZones },
      direction,
    );
    expect(lean).toEqual({
      compliantPre2016: full.byEdition['pre-2016'][direction].compliant,
      compliant2016: full.byEdition['2016'][direction].compliant,
      countedTypes2016: full.byEdition['2016'][direction].countedTypes.length,
    });
  }
}

describe('entrapmentVerdicts', () => {
  it('agrees with the full judgement for every kind, class and closing setting over seeded device combinations', () => {
    const rng = createPrng(4_242);
    let cases = 0;
    for (const gateKind of GATE_KINDS)
      for (const usageClass of [1, 2, 3, 4] as const)
        for (const automaticClosing of [false, true])
          for (let n = 0; n < 120; n++) {
            const devices = Array.from({ length: rng.int(0, 6) }, () => ({
              type: rng.pick(ENTRAPMENT_DEVICE_TYPES),
              direction: rng.pick(DIRECTIONS),
              monitored: rng.chance(0.6),
            }));
            compare(gateKind, usageClass, automaticClosing, devices, {
              opening: rng.chance(0.5),
              closing: rng.chance(0.7),
            });
            cases++;
          }
    expect(cases).toBeGreaterThan(5000);
  });

  it('agrees with the full judgement for each single device and each pair, in every zone setting', () => {
    const singles = ENTRAPMENT_DEVICE_TYPES.flatMap((type) =>
      [true, false].map((monitored) => ({ type, direction: 'closing' as const, monitored })),
    );
    for (const gateKind of GATE_KINDS)
      for (const usageClass of [1, 2, 3, 4] as const)
        for (const automaticClosing of [false, true])
          for (const zone of [false, true]) {
            const zones = { opening: zone, closing: zone };
            compare(gateKind, usageClass, automaticClosing, [], zones);
            for (const a of singles) {
              compare(gateKind, usageClass, automaticClosing, [a], zones);
              for (const b of singles) compare(gateKind, usageClass, automaticClosing, [a, b], zones);
            }
          }
  });
});
