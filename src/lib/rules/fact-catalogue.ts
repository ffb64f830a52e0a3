/**
 * Every fact a ruleset may read besides its own questions (`answers.<key>`, `m.<key>`): the gate
 * profile, the site, and what the calculators derive. The validator refuses a rule that reads a
 * fact not listed here, and the engine uses the labels (and the questions a derived fact comes
 * from) to say exactly what is missing when a finding needs information.
 */

/** How a fact is described to an auditor, and what it is worked out from. */
export interface FactSpec {
  /** Plain-words description, used in "needs information" lists. */
  readonly label: string;
  /** Always present once the input parses (required profile and site fields). */
  readonly always?: true;
  /** Question facts a derived fact is computed from; a ruleset using the fact must ask them. */
  readonly from?: readonly string[];
}

/** Question keys the power calculator reads: the ruleset must ask these to use `calc.power.*`. */
export const POWER_INPUT_KEYS = Object.freeze({
  wireGauge: 'wireGaugeAwg',
  conductor: 'wireConductor',
  runLength: 'lowVoltageRunMm',
  current: 'operatorCurrentA',
  supply: 'supplyVoltageV',
  chargingSource: 'chargingSource',
});

/** Question keys the signage calculator reads. */
export const SIGNAGE_INPUT_KEYS = Object.freeze({ side1: 'placardsSide1', side2: 'placardsSide2' });

const always = (label: string): FactSpec => ({ label, always: true });
const derived = (label: string, from?: readonly string[]): FactSpec => (from ? { label, from } : { label });

const ENTRAPMENT = 'entrapment zones and the protection devices fitted, per direction of travel';
const FORCE = 'force tests at the measuring points (trace or meter summary)';
const GEOMETRY =
  'swing operator geometry (A and B offsets, bracket distance, retracted length, stroke, opening angle)';
const POWER_DROP = [
  `answers.${POWER_INPUT_KEYS.wireGauge}`,
  `answers.${POWER_INPUT_KEYS.conductor}`,
  `m.${POWER_INPUT_KEYS.runLength}`,
  `m.${POWER_INPUT_KEYS.current}`,
  `m.${POWER_INPUT_KEYS.supply}`,
];

export const FACT_CATALOGUE: Readonly<Record<string, FactSpec>> = Object.freeze({
  'profile.kind': always('Gate kind'),
  'profile.leaves': always('Single or double leaf'),
  'profile.openingDirection': derived(
    'Which way the swing gate opens (toward or away from the operator side)',
  ),
  'profile.usageClass': always('Usage class'),
  'profile.leafWidthMm': derived('Leaf width'),
  'profile.leafHeightMm': derived('Leaf height'),
  'profile.leafWeightKg': derived('Leaf weight'),
  'profile.operatorListed': always('Operator listed to the applicable safety standard'),
  'profile.automaticClosing': always('Automatic closing on or off'),
  'profile.operatorManufacturedOn': derived("Operator's date of manufacture (from its label)"),
  'site.pedestriansUseDriveway': always('Pedestrians use the driveway'),
  'site.childrenOrPetsPresent': always('Children or pets present'),
  'site.publicAccess': always('Public access'),
  'site.slopeAcrossSwing': always('Ground slopes across the swing'),

  'calc.entrapment.rules2016': derived(
    "Operator's date of manufacture, or the UL 325 edition it is listed to",
  ),
  'calc.entrapment.deviceCount': derived(ENTRAPMENT),
  'calc.entrapment.zonesWithoutExternalSensor': derived(ENTRAPMENT),
  'calc.entrapment.unmonitoredExternal': derived(ENTRAPMENT),
  'calc.entrapment.typeDWithAutoClose': derived(ENTRAPMENT),
  'calc.entrapment.zonesFromMeasurements': derived(ENTRAPMENT),
  'calc.entrapment.fixedObjectZoneProtected': derived(
    'a monitored edge or photo-eye listed for the open side, opening direction (the fixed-object zone)',
  ),
  'calc.entrapment.photoEyes': derived(ENTRAPMENT),
  'calc.entrapment.edges': derived(ENTRAPMENT),
  ...directionFacts('closing'),
  ...directionFacts('opening'),

  'calc.force.testCount': derived(FORCE),
  'calc.force.rejectedTraces': derived(FORCE),
  'calc.force.largeGapTests': derived(FORCE),
  'calc.force.acceptedGapsMm': derived(FORCE),
  'calc.force.smallGapMaxPeakN': derived('force tests at gaps of 50–500 mm'),
  'calc.force.largeGapMaxPeakN': derived('force tests at gaps over 500 mm'),
  'calc.force.worst.peakN': derived(FORCE),
  'calc.force.worst.durationAbove150S': derived(FORCE),
  'calc.force.worst.staticN': derived(FORCE),
  'calc.force.worst.residualAt5sN': derived(FORCE),

  'calc.geometry.minClearanceMm': derived(GEOMETRY),
  'calc.geometry.swingReachable': derived(GEOMETRY),
  'calc.geometry.passesDeadCentre': derived(GEOMETRY),
  'calc.geometry.minLeverArmMm': derived(GEOMETRY),
  'calc.geometry.operatorLeafClearanceMm': derived(
    `operator-to-leaf clearance: measured on site, or from the ${GEOMETRY}`,
    ['m.operatorLeafClearanceMm'],
  ),

  'calc.power.dropPercent': derived('voltage drop on the low-voltage run', POWER_DROP),
  'calc.power.dropV': derived('voltage drop on the low-voltage run', POWER_DROP),
  'calc.power.chargingSourceCount': derived('charging source', [
    `answers.${POWER_INPUT_KEYS.chargingSource}`,
  ]),

  'calc.signage.totalPlacards': derived('warning placards counted on both sides', [
    `m.${SIGNAGE_INPUT_KEYS.side1}`,
    `m.${SIGNAGE_INPUT_KEYS.side2}`,
  ]),
});

function directionFacts(direction: 'closing' | 'opening'): Record<string, FactSpec> {
  const base = `calc.entrapment.${direction}`;
  return {
    [`${base}.zone`]: derived(ENTRAPMENT),
    [`${base}.compliantPre2016`]: derived(ENTRAPMENT),
    [`${base}.compliant2016`]: derived(ENTRAPMENT),
    [`${base}.countedTypes2016`]: derived(ENTRAPMENT),
    [`${base}.externalSensors`]: derived(ENTRAPMENT),
    [`${base}.monitoredSensors`]: derived(ENTRAPMENT),
  };
}

/** Fact namespaces a rule may read, and what each holds. */
export const FACT_PREFIXES = Object.freeze({
  answers: 'a yes/no/na, choice, date or text answer (`answers.<questionKey>`)',
  m: 'a measurement in canonical units (`m.<questionKey>`)',
  params: "the rule's own thresholds (`params.<name>`)",
});
