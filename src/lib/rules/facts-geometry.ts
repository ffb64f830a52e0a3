/**
 * Swing-operator geometry facts (`calc.geometry.*`) from the operator layout: smallest clearance
 * to the leaf, whether the ram reaches the whole swing, whether it passes dead centre.
 */
import { summariseSwingOperatorGeometry } from './calculators/swing-geometry';
import { refusal, type EvidenceProblem } from './evidence';
import type { AssessmentInput } from './input';

/**
 * The geometry sweep samples the whole swing and is by far the dearest calculator, while the
 * walk-through re-scores the same gate after every answer: recent layouts are remembered.
 */
const GEOMETRY_MEMO_SIZE = 256;
const geometryMemo = new Map<string, Record<string, unknown> | EvidenceProblem>();

/** The geometry facts of one layout, or null (and a problem) when the layout is impossible. */
export function geometryFacts(
  g: NonNullable<AssessmentInput['swingGeometry']>,
  problems: EvidenceProblem[],
): Record<string, unknown> | null {
  const key = [
    g.aMm,
    g.bMm,
    g.bracketFromHingeMm,
    g.retractedLengthMm,
    g.strokeMm,
    g.targetOpeningDeg,
    g.bracketOffsetMm,
    g.leafThicknessMm,
    g.operatorHalfWidthMm,
    g.operatorBodyLengthMm,
  ].join('|');
  let found = geometryMemo.get(key);
  if (!found) {
    try {
      const r = summariseSwingOperatorGeometry(g);
      found = {
        minClearanceMm: r.minClearanceMm,
        swingReachable: r.swingReachable,
        passesDeadCentre: r.passesDeadCentre,
        minLeverArmMm: r.minLeverArmMm,
      };
    } catch (error) {
      found = refusal('swingGeometry', error);
    }
    if (geometryMemo.size >= GEOMETRY_MEMO_SIZE)
      geometryMemo.delete(geometryMemo.keys().next().value as string);
    geometryMemo.set(key, found);
  }
  if ('code' in found && 'path' in found) {
    problems.push({ ...(found as EvidenceProblem) });
    return null;
  }
  return { ...found };
}
