/**
 * Crushing gaps between a moving gate and anything fixed: which parts of a person fit in the
 * gap and can be crushed there (EN ISO 13854), and whether hinge-side gaps trap fingers.
 */
import { requireNonNegative, roundMm } from './numbers';

/** Body parts with a minimum gap in EN ISO 13854; `hand` covers hand, wrist and fist. */
export type BodyPart = 'body' | 'head' | 'leg' | 'foot' | 'arm' | 'hand' | 'toes' | 'finger';

/**
 * Minimum gaps to avoid crushing, mm. EN ISO 13854 Table 1 (values of EN 349, unchanged);
 * read on the AUVA safety-distances page — secondary source, verify against the current edition.
 * Listed largest first, which is also the order of `partsAtRisk`.
 */
export const ISO13854_MIN_GAP_MM: Readonly<Record<BodyPart, number>> = Object.freeze({
  body: 500,
  head: 300,
  leg: 180,
  foot: 120,
  arm: 120,
  hand: 100,
  toes: 50,
  finger: 25,
});

/** A gap under 8 mm keeps fingers out. DHF TS 011; secondary source, verify. */
export const DHF_FINGER_SAFE_GAP_MM = 8;

/**
 * Hinge-side gaps must be either under 4 mm (fingers cannot enter) or over 25 mm (fingers
 * cannot be trapped). DHF TS 011; secondary source, verify.
 */
export const DHF_HINGE_GAP_MM = Object.freeze({ fingerSafeBelowMm: 4, fingerClearAboveMm: 25 });

/** Limits a ruleset may pass instead of the defaults above. */
export interface CrushingGapOptions {
  minGapsMm?: Partial<Record<BodyPart, number>>;
  fingerSafeBelowMm?: number;
}

/** What a crushing gap means for people, for findings and the report. */
export interface CrushingGapResult {
  gapMm: number;
  /** The gap is too narrow for a finger to enter (gap < finger-safe threshold). */
  fingerSafe: boolean;
  /** Some body part can enter the gap and be crushed in it. */
  isCrushHazard: boolean;
  /** Parts whose minimum gap exceeds this gap, largest first; empty when finger-safe. */
  partsAtRisk: BodyPart[];
  /** The gap that would clear every listed part (the largest minimum gap). */
  gapClearingAllPartsMm: number;
}

/**
 * Judges the smallest gap a moving gate leaves against a fixed part (post, wall, ground).
 *
 * A part is at risk when the gap is smaller than its minimum gap, unless the gap is finger-safe.
 * Boundary: a gap exactly at the finger-safe threshold is not finger-safe (DHF says "under
 * 8 mm"), so parts count as at risk from the threshold upward; a gap equal to a part's
 * minimum gap clears that part (EN ISO 13854 gives the minimum gap that is sufficient).
 */
export function assessCrushingGap(gapMm: number, opts: CrushingGapOptions = {}): CrushingGapResult {
  requireNonNegative('gapMm', gapMm);
  const minGaps: Record<BodyPart, number> = { ...ISO13854_MIN_GAP_MM, ...opts.minGapsMm };
  const fingerSafeBelowMm = opts.fingerSafeBelowMm ?? DHF_FINGER_SAFE_GAP_MM;
  const fingerSafe = gapMm < fingerSafeBelowMm;
  const parts = (Object.keys(minGaps) as BodyPart[]).sort((a, b) => minGaps[b] - minGaps[a]);
  const partsAtRisk = fingerSafe ? [] : parts.filter((part) => gapMm < minGaps[part]);
  return {
    gapMm: roundMm(gapMm),
    fingerSafe,
    isCrushHazard: partsAtRisk.length > 0,
    partsAtRisk,
    gapClearingAllPartsMm: roundMm(Math.max(...parts.map((part) => minGaps[part]))),
  };
}

/** Why a hinge gap is safe or not, for the report wording. */
export type HingeGapVerdict = 'too_narrow_for_fingers' | 'clear_of_fingers' | 'finger_trap';

/** Judgement of one hinge-side gap. */
export interface HingeGapResult {
  gapMm: number;
  safe: boolean;
  isFingerTrap: boolean;
  verdict: HingeGapVerdict;
}

/**
 * Judges the gap on the hinge side of a swing leaf, which opens and closes as the leaf turns.
 * Boundaries follow the wording "under 4 mm or over 25 mm": exactly 4 mm and exactly 25 mm are traps.
 */
export function assessHingeGap(
  gapMm: number,
  limits: { fingerSafeBelowMm?: number; fingerClearAboveMm?: number } = {},
): HingeGapResult {
  requireNonNegative('gapMm', gapMm);
  const below = limits.fingerSafeBelowMm ?? DHF_HINGE_GAP_MM.fingerSafeBelowMm;
  const above = limits.fingerClearAboveMm ?? DHF_HINGE_GAP_MM.fingerClearAboveMm;
  const verdict: HingeGapVerdict =
    gapMm < below ? 'too_narrow_for_fingers' : gapMm > above ? 'clear_of_fingers' : 'finger_trap';
  return { gapMm: roundMm(gapMm), safe: verdict !== 'finger_trap', isFingerTrap: verdict === 'finger_trap', verdict };
}
