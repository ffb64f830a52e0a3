/**
 * What the demo auditors "found" at each gate: a full set of answers and measurements for the
 * North American family, starting from a well-kept gate and adding faults until the engine's
 * verdict matches the condition the scenario wants. Measurements are entered in the units a
 * technician in the field would use and carry their canonical value.
 */
import { measure, type LengthUnit } from '../../../src/lib/units';
import type { GateCondition } from './directory';

type Answer = { value: string; note?: string };
type Measured = { value: number; unit: string; canonical: number };

export interface WalkDocuments {
  answers: Record<string, Answer>;
  measurements: Record<string, Measured>;
  observations: Record<string, unknown>;
}

const length = (value: number, unit: LengthUnit): Measured => measure('length', value, unit);
const plain = (value: number, unit: string): Measured => ({ value, unit, canonical: value });

/** A well-kept installation: every item answered the way a careful installer leaves it. */
export function soundWalk(kind: 'swing' | 'slide', context: WalkContext): WalkDocuments {
  const yes = { value: 'yes' };
  const no = { value: 'no' };
  const answers: Record<string, Answer> = {
    placardsLegible: yes,
    pedestrianEntrance: yes,
    operatorLabelReadable: yes,
    restrainedIfDetached: yes,
    barbedTapeFitted: no,
    barbedWireFitted: no,
    latchFitted: no,
    pedestrianDoorInLeaf: no,
    closingEdgeProtected: yes,
    controlReachThrough: no,
    controlLineOfSight: yes,
    manualReleaseSecure: yes,
    photoEyeTestReverses: yes,
    edgeTestReverses: yes,
    secondContactStops: yes,
    wireGaugeAwg: { value: 'awg12' },
    wireConductor: { value: 'stranded' },
    chargingSource: { value: 'transformer' },
    lowVoltageWireDirectBurial: yes,
    conduitWhereLeavingGround: yes,
    operatorGrounded: yes,
    forceSetLowest: yes,
    remoteCodesChanged: yes,
    ownerShown: yes,
    manualLeft: yes,
    maintenancePlanGiven: yes,
  };
  const measurements: Record<string, Measured> = {
    placardsSide1: plain(1, 'count'),
    placardsSide2: plain(1, 'count'),
    bottomProtrusionMm: length(0.25, 'in'),
    controlDistanceMm: length(9, 'ft'),
    reversalStartS: plain(0.8, 's'),
    reversalTravelMm: length(3, 'in'),
    lowVoltageRunMm: length(40, 'ft'),
    operatorCurrentA: plain(4, 'A'),
    supplyVoltageV: plain(24, 'V'),
    controlBoxHeightMm: length(40, 'in'),
    batteryBoxHeightMm: length(40, 'in'),
    distanceToAcSourceMm: length(5, 'ft'),
  };
  if (context.childrenOrPetsPresent) answers.controlsOutOfChildReach = yes;
  if (kind === 'swing') {
    Object.assign(answers, {
      hingeSideGuarded: yes,
      operatorArmGuarded: yes,
      objectBehindOpenGate: no,
      positiveStopClosed: yes,
    });
    Object.assign(measurements, {
      bottomGapMm: length(3, 'in'),
      hingeGapMm: length(30, 'mm'),
      fixedObjectClearanceMm: length(20, 'in'),
    });
    if (context.slopeAcrossSwing) measurements.bottomClearanceOverSwingMm = length(2, 'in');
  } else {
    Object.assign(answers, {
      fenceCoveredScreened: yes,
      rollersGuarded: yes,
      positiveStopsBothEnds: yes,
      postGapGuarded: yes,
    });
    Object.assign(measurements, {
      largestOpeningMm: length(1.5, 'in'),
      openingsGuardedToMm: length(6, 'ft'),
      postGapMm: length(6, 'mm'),
      gateSpeedMps: measure('speed', 0.8, 'ft/s'),
    });
  }
  const observations: Record<string, unknown> = {
    entrapment: {
      zones: [
        { zone: 'closing_edge', direction: 'closing' },
        { zone: kind === 'swing' ? 'open_side' : 'post_gap', direction: 'opening' },
      ],
      devices: [
        { type: 'A', direction: 'closing', zone: 'closing_edge', monitored: true },
        {
          type: context.photoEyeNotListed ? 'B2' : 'B1',
          direction: 'closing',
          zone: 'closing_edge',
          monitored: true,
        },
        {
          type: 'A',
          direction: 'opening',
          zone: kind === 'swing' ? 'open_side' : 'post_gap',
          monitored: true,
        },
        {
          type: 'B2',
          direction: 'opening',
          zone: kind === 'swing' ? 'open_side' : 'post_gap',
          monitored: true,
        },
      ],
    },
  };
  if (kind === 'swing' && context.openingDirection === 'pull_to_open')
    observations.swingGeometry = pullToOpenRam;
  return { answers, measurements, observations };
}

export interface WalkContext {
  childrenOrPetsPresent: boolean;
  slopeAcrossSwing: boolean;
  openingDirection?: 'pull_to_open' | 'push_to_open';
  /** Only an edge is listed on the closing edge, though the photo-eye answer says it reverses the gate. */
  photoEyeNotListed?: boolean;
}

/**
 * A ram operator on a pull-to-open leaf, laid out so it reaches 90° with its body clear of the
 * leaf (checked by the swing-geometry calculator when the demo is scored).
 */
const pullToOpenRam = {
  aMm: 100,
  bMm: 150,
  bracketFromHingeMm: 900,
  retractedLengthMm: 740,
  strokeMm: 280,
  targetOpeningDeg: 90,
  bracketOffsetMm: 80,
  operatorBodyLengthMm: 444,
};

type Fault = (walk: WalkDocuments) => void;

/** Faults a technician commonly finds, worst first within each list. */
const majorFaults: Fault[] = [
  (w) => void (w.measurements.placardsSide2 = plain(0, 'count')),
  (w) => void (w.answers.remoteCodesChanged = { value: 'no', note: 'Remotes still on the factory code.' }),
  (w) => void (w.measurements.controlDistanceMm = length(4, 'ft')),
  (w) => void (w.answers.forceSetLowest = { value: 'no', note: 'Obstruction sensitivity near maximum.' }),
];

const criticalFaults: Record<'swing' | 'slide', Fault[]> = {
  swing: [
    (w) => void (w.measurements.fixedObjectClearanceMm = length(10, 'in')),
    (w) =>
      void (w.answers.photoEyeTestReverses = { value: 'no', note: 'Photo-eye blocked: gate kept closing.' }),
    (w) => void (w.measurements.hingeGapMm = length(12, 'mm')),
  ],
  slide: [
    (w) => void (w.measurements.largestOpeningMm = length(4, 'in')),
    (w) => void (w.answers.rollersGuarded = { value: 'no', note: 'Exposed rollers at ankle height.' }),
    (w) => void (w.answers.edgeTestReverses = { value: 'no', note: 'Edge pressed: no reversal.' }),
  ],
};

/**
 * Adds faults to a sound walk until `verdictOf` gives the verdict the condition stands for
 * (sound → clear, needs_work → remedy, dangerous → withdraw).
 */
export function walkFor(
  kind: 'swing' | 'slide',
  context: WalkContext,
  condition: GateCondition,
  verdictOf: (walk: WalkDocuments) => string,
  seed: number,
): WalkDocuments {
  const walk = soundWalk(kind, context);
  const wanted = condition === 'sound' ? 'clear' : condition === 'needs_work' ? 'remedy' : 'withdraw';
  // A dangerous swing gate is first found with a wall near its open leaf (its open side carries a
  // monitored edge, which the newest North American version counts as protecting that zone).
  const critical =
    kind === 'swing'
      ? [criticalFaults.swing[0]!, ...rotate(criticalFaults.swing.slice(1), seed)]
      : rotate(criticalFaults.slide, seed);
  const faults =
    condition === 'sound'
      ? []
      : condition === 'needs_work'
        ? rotate(majorFaults, seed)
        : [...critical, ...majorFaults];
  for (const fault of faults) {
    if (verdictOf(walk) === wanted) break;
    fault(walk);
  }
  return walk;
}

function rotate<T>(items: T[], by: number): T[] {
  const k = by % items.length;
  return [...items.slice(k), ...items.slice(0, k)];
}
