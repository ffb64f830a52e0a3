/**
 * Entrapment facts (`calc.entrapment.*`): the UL 325 judgement per direction under both regimes
 * (pre-2016 table, 2016 two independent means), which regime applies to this operator, and the
 * plain counts rules read (external sensors, unmonitored ones, zones no sensor watches).
 */
import { assessEntrapmentProtection, type FittedDevice } from './calculators/entrapment-protection';
import type { AssessmentInput, EntrapmentInput } from './input';

const isExternalSensor = (type: string): boolean => type === 'B1' || type === 'B2';

/** A zone the measurements imply (see the ruleset's `impliedZones`). */
export type ZoneAtDirection = EntrapmentInput['zones'][number];

/**
 * The zone the open swing leaf makes against a wall or fixed object: the open side, in the
 * opening direction (the leaf closes the gap as it opens).
 */
export const FIXED_OBJECT_ZONE = Object.freeze({ zone: 'open_side', direction: 'opening' } as const);

/**
 * The entrapment facts of one input that recorded its zones and devices. `implied` are the
 * zones the measurements imply; they count as if the auditor had listed them.
 */
export function entrapmentFacts(
  input: AssessmentInput,
  recorded: EntrapmentInput,
  implied: readonly ZoneAtDirection[] = [],
): Record<string, unknown> {
  let e = recorded;
  let added = 0;
  if (implied.length > 0) {
    const zonesList = [...recorded.zones];
    for (const z of implied) {
      if (!zonesList.some((listed) => listed.zone === z.zone && listed.direction === z.direction)) {
        zonesList.push(z);
        added += 1;
      }
    }
    if (added > 0) e = { ...recorded, zones: zonesList };
  }
  const devices: Record<'opening' | 'closing', FittedDevice[]> = { opening: [], closing: [] };
  for (const d of e.devices) devices[d.direction].push({ type: d.type, monitored: d.monitored });
  const zones = {
    opening: e.zones.some((z) => z.direction === 'opening'),
    closing: e.zones.some((z) => z.direction === 'closing'),
  };
  const judged = assessEntrapmentProtection({
    gateKind: input.profile.kind,
    usageClass: input.profile.usageClass,
    automaticClosing: input.profile.automaticClosing,
    manufacturedOn: input.profile.operatorManufacturedOn ?? null,
    edition: e.edition ?? null,
    devices,
    entrapmentZones: zones,
  });
  const facts: Record<string, unknown> = {
    deviceCount: e.devices.length,
    zonesWithoutExternalSensor: e.zones.filter(
      (z) =>
        !e.devices.some((d) => d.zone === z.zone && d.direction === z.direction && isExternalSensor(d.type)),
    ).length,
    unmonitoredExternal: e.devices.filter((d) => isExternalSensor(d.type) && !d.monitored).length,
    typeDWithAutoClose: input.profile.automaticClosing && e.devices.some((d) => d.type === 'D'),
    zonesFromMeasurements: added,
    // UL 325 2016 revision (secondary source): external devices count when monitored every cycle;
    // a monitored edge or photo-eye listed for the open side while opening protects the fixed-object zone.
    fixedObjectZoneProtected: e.devices.some(
      (d) =>
        d.zone === FIXED_OBJECT_ZONE.zone &&
        d.direction === FIXED_OBJECT_ZONE.direction &&
        isExternalSensor(d.type) &&
        d.monitored,
    ),
    photoEyes: e.devices.filter((d) => d.type === 'B1').length,
    edges: e.devices.filter((d) => d.type === 'B2').length,
  };
  if (judged.applicableEdition) facts.rules2016 = judged.applicableEdition === '2016';
  for (const direction of ['closing', 'opening'] as const) {
    const pre = judged.byEdition['pre-2016'][direction];
    const now = judged.byEdition['2016'][direction];
    const external = e.devices.filter((d) => d.direction === direction && isExternalSensor(d.type));
    const side: Record<string, unknown> = {
      zone: zones[direction],
      countedTypes2016: now.countedTypes.length,
      externalSensors: external.length,
      monitoredSensors: external.filter((d) => d.monitored).length,
    };
    if (pre.compliant !== null) side.compliantPre2016 = pre.compliant;
    if (now.compliant !== null) side.compliant2016 = now.compliant;
    facts[direction] = side;
  }
  return facts;
}
