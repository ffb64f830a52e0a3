/**
 * Slide-gate construction checks (ASTM F2200) and the gap at the posts (UL 325 entrapment
 * zone, DHF guidance), so the rules can tell a guarded slide gate from one that can draw in
 * hands or feet.
 */
import { checkAbove, checkAtLeast, checkAtMost, checkBelow, combinePasses, type LimitCheck } from './limit-check';
import { optionalBoolean, optionalNonNegative, roundMm } from './numbers';

/** Which ASTM F2200 guard-height rule applies: editions before 2011 asked for 48 in. */
export type SlideGateEdition = 'current' | 'pre-2011';

/** ASTM F2200, slide gates: openings must stop a 2-1/4 in sphere (57.15 mm exact). Secondary source, verify. */
export const ASTM_F2200_SPHERE_DIAMETER_MM = 57.15; // 2-1/4 in

/**
 * ASTM F2200, slide gates: openings guarded from the bottom of the gate up to 72 in (1828.8 mm)
 * or the top if lower; older editions 48 in (1219.2 mm). Secondary source, verify against the
 * current edition.
 */
export const ASTM_F2200_OPENING_GUARD_HEIGHT_MM: Readonly<Record<SlideGateEdition, number>> = Object.freeze({
  current: 1828.8, // 72 in
  'pre-2011': 1219.2, // 48 in
});

/** ASTM F2200, slide gates: exposed weight-bearing rollers up to 8 ft (2438.4 mm) are guarded. Secondary source, verify. */
export const ASTM_F2200_ROLLER_GUARD_HEIGHT_MM = 2438.4; // 8 ft

/** UL 325 as quoted: on a slide gate any gap under 16 in (406.4 mm) is an entrapment zone. Secondary source, verify. */
export const UL325_SLIDE_ENTRAPMENT_GAP_MM = 406.4; // 16 in

/** DHF TS 011: a solid slide gate at most 8 mm from its post. Secondary source, verify. */
export const DHF_SOLID_SLIDE_GATE_POST_GAP_MAX_MM = 8;

/** Limits a ruleset may pass instead of the defaults above. */
export interface SlideGateLimits {
  sphereDiameterMm: number;
  openingGuardHeightMm: Record<SlideGateEdition, number>;
  rollerGuardHeightMm: number;
  entrapmentGapMm: number;
  solidGatePostGapMaxMm: number;
}

/** What the auditor measures and answers about a slide gate. */
export interface SlideGateInput {
  /** Largest opening in the gate, and in the fence the open gate covers, within the guarded zone. */
  largestOpeningMm?: number | null;
  /** Height from the bottom of the gate up to which every opening is that small (infill or mesh height). */
  openingsGuardedToHeightMm?: number | null;
  gateHeightMm?: number | null;
  /** Height above grade of the (lowest) weight-bearing roller left exposed; omit when unknown. */
  rollersExposedBelowMm?: number | null;
  rollersGuarded?: boolean | null;
  positiveStopsBothEnds?: boolean | null;
  /** Gap between the gate and its post (closed or open position, the smaller one). */
  postGapMm?: number | null;
  edition?: SlideGateEdition;
}

/** Each slide-gate check, for findings and the report. */
export interface SlideGateResult {
  edition: SlideGateEdition;
  /** Height up to which openings must stop the sphere: the edition's height or the gate top if lower; null without the gate height. */
  guardZoneTopMm: number | null;
  openingSize: LimitCheck;
  guardedHeight: LimitCheck;
  rollers: { pass: boolean | null; guarded: boolean | null; exposedRoller: LimitCheck };
  positiveStops: { pass: boolean | null };
  postGap: {
    /** UL 325: a gap under 16 in is an entrapment zone needing protection (a fact, not a failure). */
    entrapmentZone: boolean | null;
    entrapmentGap: LimitCheck;
    /** DHF limit for solid slide gates; the ruleset decides whether it applies. */
    solidGateLimit: LimitCheck;
  };
  /** ASTM F2200 construction checks together (openings, guarded height, rollers, stops). */
  pass: boolean | null;
}

/** Judges a slide gate's openings, rollers, stops and post gap. */
export function assessSlideGate(input: SlideGateInput, limits: Partial<SlideGateLimits> = {}): SlideGateResult {
  const edition = input.edition ?? 'current';
  const sphere = limits.sphereDiameterMm ?? ASTM_F2200_SPHERE_DIAMETER_MM;
  const editionHeight = { ...ASTM_F2200_OPENING_GUARD_HEIGHT_MM, ...limits.openingGuardHeightMm }[edition];
  const rollerHeight = limits.rollerGuardHeightMm ?? ASTM_F2200_ROLLER_GUARD_HEIGHT_MM;
  const entrapmentGap = limits.entrapmentGapMm ?? UL325_SLIDE_ENTRAPMENT_GAP_MM;
  const solidPostGap = limits.solidGatePostGapMaxMm ?? DHF_SOLID_SLIDE_GATE_POST_GAP_MAX_MM;

  const gateHeight = optionalNonNegative('gateHeightMm', input.gateHeightMm);
  const guardedTo = optionalNonNegative('openingsGuardedToHeightMm', input.openingsGuardedToHeightMm);
  const zoneTop = gateHeight === null ? editionHeight : Math.min(gateHeight, editionHeight);

  const openingSize = checkBelow(optionalNonNegative('largestOpeningMm', input.largestOpeningMm), sphere, 2);
  let guardedHeight = checkAtLeast(guardedTo, zoneTop);
  // Without the gate height a lower guard might still reach the top of a short gate: unknown, not a fail.
  if (gateHeight === null && guardedHeight.pass === false) guardedHeight = { ...guardedHeight, pass: null };

  const rollersGuarded = optionalBoolean(input.rollersGuarded);
  // Exposed rollers exactly at the guard height are still "up to 8 ft": only strictly above is out of reach.
  const exposedRoller = checkAbove(
    optionalNonNegative('rollersExposedBelowMm', input.rollersExposedBelowMm),
    rollerHeight,
  );
  const rollersPass = rollersGuarded === true ? true : rollersGuarded === false ? (exposedRoller.pass ?? false) : null;

  const positiveStopsPass = optionalBoolean(input.positiveStopsBothEnds);
  const postGap = optionalNonNegative('postGapMm', input.postGapMm);
  const entrapment = checkAtLeast(postGap, entrapmentGap);

  return {
    edition,
    guardZoneTopMm: gateHeight === null ? null : roundMm(zoneTop),
    openingSize,
    guardedHeight,
    rollers: { pass: rollersPass, guarded: rollersGuarded, exposedRoller },
    positiveStops: { pass: positiveStopsPass },
    postGap: {
      entrapmentZone: entrapment.pass === null ? null : !entrapment.pass,
      entrapmentGap: entrapment,
      solidGateLimit: checkAtMost(postGap, solidPostGap),
    },
    pass: combinePasses(openingSize.pass, guardedHeight.pass, rollersPass, positiveStopsPass),
  };
}
