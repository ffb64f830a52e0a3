/**
 * Entrapment facts (`calc.entrapment.*`): the UL 325 judgement per direction under both regimes
 * (pre-2016 table, 2016 two independent means), which regime applies to this operator, and the
 * plain counts rules read (external sensors, unmonitored ones, zones no sensor watches).
 */
import { applicableEntrapmentEdition, entrapmentVerdicts } from './calculators/entrapment-protection';
import type { AssessmentInput, EntrapmentInput } from './input';

const isExternalSensor = (type: string): boolean => type === 'B1' || type === 'B2';

/** The facts list closing first, then opening. */
const DIRECTIONS = ['closing', 'opening'] as const;

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
  const { devices, zones: listed } = e;
  const zones = { opening: false, closing: false };
  for (let i = 0; i < listed.length; i++) zones[listed[i]!.direction] = true;
  const { kind, usageClass, automaticClosing } = input.profile;
  const applicableEdition = applicableEntrapmentEdition(
    input.profile.operatorManufacturedOn ?? null,
    e.edition ?? null,
  );
  const judged = { gateKind: kind, usageClass, automaticClosing, devices, entrapmentZones: zones };
  let unmonitoredExternal = 0;
  let typeD = false;
  let fixedObjectZoneProtected = false;
  let photoEyes = 0;
  let edges = 0;
  for (let i = 0; i < devices.length; i++) {
    const d = devices[i]!;
    const external = isExternalSensor(d.type);
    if (external && !d.monitored) unmonitoredExternal++;
    if (d.type === 'D') typeD = true;
    if (d.type === 'B1') photoEyes++;
    else if (d.type === 'B2') edges++;
    // UL 325 2016 revision (secondary source): external devices count when monitored every cycle;
    // a monitored edge or photo-eye listed for the open side while opening protects the fixed-object zone.
    if (
      d.zone === FIXED_OBJECT_ZONE.zone &&
      d.direction === FIXED_OBJECT_ZONE.direction &&
      external &&
      d.monitored
    )
      fixedObjectZoneProtected = true;
  }
  let zonesWithoutExternalSensor = 0;
  for (let i = 0; i < listed.length; i++) {
    const z = listed[i]!;
    let watched = false;
    for (let j = 0; j < devices.length && !watched; j++) {
      const d = devices[j]!;
      watched = d.zone === z.zone && d.direction === z.direction && isExternalSensor(d.type);
    }
    if (!watched) zonesWithoutExternalSensor++;
  }
  const facts: Record<string, unknown> = {
    deviceCount: devices.length,
    zonesWithoutExternalSensor,
    unmonitoredExternal,
    typeDWithAutoClose: automaticClosing && typeD,
    zonesFromMeasurements: added,
    fixedObjectZoneProtected,
    photoEyes,
    edges,
  };
  if (applicableEdition) facts.rules2016 = applicableEdition === '2016';
  for (const direction of DIRECTIONS) {
    const verdict = entrapmentVerdicts(judged, direction);
    let externalSensors = 0;
    let monitoredSensors = 0;
    for (let i = 0; i < devices.length; i++) {
      const d = devices[i]!;
      if (d.direction !== direction || !isExternalSensor(d.type)) continue;
      externalSensors++;
      if (d.monitored) monitoredSensors++;
    }
    const side: Record<string, unknown> = {
      zone: zones[direction],
      countedTypes2016: verdict.countedTypes2016,
      externalSensors,
      monitoredSensors,
    };
    if (verdict.compliantPre2016 !== null) side.compliantPre2016 = verdict.compliantPre2016;
    if (verdict.compliant2016 !== null) side.compliant2016 = verdict.compliant2016;
    facts[direction] = side;
  }
  return facts;
}
