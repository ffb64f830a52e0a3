/**
 * Assessment inputs for the ruleset tests: a swing and a slide gate as an auditor might record
 * them, each with some things wrong. Invented sites; measurements entered in the units a
 * technician would use (inches, feet, millimetres) with the canonical value worked out by the
 * same `measure()` the forms use.
 */
import { measure } from '../../../src/lib/units';

const length = (value: number, unit: 'mm' | 'in' | 'ft') => measure('length', value, unit);
const count = (value: number) => ({ value, unit: 'count', canonical: value });
const yes = { value: 'yes' as const };
const no = { value: 'no' as const };

const quietSite = {
  pedestriansUseDriveway: true,
  childrenOrPetsPresent: true,
  publicAccess: false,
  slopeAcrossSwing: false,
};

/**
 * A pull-to-open residential swing gate whose open leaf stops 12 in from a brick pier
 * (ASTM F2200 asks for 16 in: a critical failure), one placard only, and the hinge side open.
 */
export function swingGateInput() {
  return {
    profile: {
      kind: 'swing',
      leaves: 'single',
      openingDirection: 'pull_to_open',
      usageClass: 1,
      leafWidth: length(12, 'ft'),
      operatorListed: true,
      automaticClosing: false,
    },
    site: quietSite,
    answers: {
      placardsLegible: yes,
      hingeSideGuarded: no,
      objectBehindOpenGate: no,
      closingEdgeProtected: yes,
      photoEyeTestReverses: yes,
      forceSetLowest: yes,
      remoteCodesChanged: no,
    },
    measurements: {
      placardsSide1: count(1),
      placardsSide2: count(0),
      hingeGapMm: length(40, 'mm'),
      fixedObjectClearanceMm: length(12, 'in'),
      controlDistanceMm: length(8, 'ft'),
    },
  };
}

/** A commercial slide gate with a 4 in opening in its lower panel and unguarded rollers. */
export function slideGateInput() {
  return {
    profile: {
      kind: 'slide',
      leaves: 'single',
      usageClass: 3,
      leafWidth: length(20, 'ft'),
      operatorListed: true,
      automaticClosing: true,
    },
    site: { ...quietSite, childrenOrPetsPresent: false, publicAccess: true },
    answers: { rollersGuarded: no, positiveStopsBothEnds: yes, placardsLegible: yes },
    measurements: {
      placardsSide1: count(1),
      placardsSide2: count(1),
      largestOpeningMm: length(4, 'in'),
      openingsGuardedToMm: length(6, 'ft'),
      postGapMm: length(2, 'in'),
    },
  };
}
