/**
 * Force facts (`calc.force.*`) from the force tests: each trace judged by the EN 12453 / EN 12445
 * calculator (or the meter's own summary), grouped by gap zone, worst figures kept. A refused
 * trace is counted and reported, never silently dropped.
 */
import { EN12453_GAP_ZONE_MM, evaluateForceTrace } from './calculators/force-trace';
import { refusal, type EvidenceProblem } from './evidence';
import type { ForceTest } from './input';
import type { GateKind } from './vocabulary';

/** Gate kinds EN 12453 holds to 400 N whatever the gap: their tests count with the small-gap ones. */
const FOUR_HUNDRED_NEWTON_KINDS: ReadonlySet<GateKind> = new Set([
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
]);

interface ForceFigures {
  peakN: number;
  durationAbove150S: number;
  staticN: number;
  residualAt5sN: number;
  smallGap: boolean;
}

/** A refusal found without running the trace calculator (no Error built: these are common and cheap to say). */
interface Refused {
  code: string;
  message: string;
}

function forceFigures(kind: GateKind, test: ForceTest): ForceFigures | Refused {
  if (test.samples) {
    const r = evaluateForceTrace(test.samples, { gateKind: kind, gapMm: test.gapMm });
    return {
      peakN: r.peak,
      durationAbove150S: r.durationAbove150,
      staticN: r.staticForce,
      residualAt5sN: r.residualAt5s,
      smallGap: FOUR_HUNDRED_NEWTON_KINDS.has(kind) || r.zone !== 'gap_over_500',
    };
  }
  if (test.gapMm < EN12453_GAP_ZONE_MM.min) {
    return {
      code: 'gap_not_covered',
      message: `A ${test.gapMm} mm gap is below the ${EN12453_GAP_ZONE_MM.min} mm measuring point`,
    };
  }
  const s = test.summary as NonNullable<ForceTest['summary']>;
  return {
    peakN: s.peakN,
    durationAbove150S: s.durationAbove150S,
    staticN: s.staticN,
    residualAt5sN: s.residualAt5sN,
    smallGap: FOUR_HUNDRED_NEWTON_KINDS.has(kind) || test.gapMm <= EN12453_GAP_ZONE_MM.max,
  };
}

/** The point a test measures: where on the gate, which way it moves, and the gap left there. */
const pointOf = (test: ForceTest): string => `${test.location}|${test.direction}|${test.gapMm}`;

/**
 * The force facts of one input's tests. A refused test (a trace sampled too slowly, a gap below
 * the first measuring point) leaves its measuring point unknown: unless another test at the same
 * point was accepted, the figures it would have counted in (the worst values and its gap band's
 * peak) are left out, so the rules reading them need information instead of passing on the
 * tests that remain. `acceptedGapsMm` lists the gaps with an accepted test (EN 12445 points);
 * `largeGapTests` counts every test submitted at a gap over 500 mm, accepted or not.
 */
export function forceFacts(
  kind: GateKind,
  tests: readonly ForceTest[],
  problems: EvidenceProblem[],
): Record<string, unknown> {
  const accepted: ForceFigures[] = [];
  const acceptedPoints = new Set<string>();
  const acceptedGaps = new Set<number>();
  const refused: ForceTest[] = [];
  let largeGapTests = 0;
  tests.forEach((test, i) => {
    if (!FOUR_HUNDRED_NEWTON_KINDS.has(kind) && test.gapMm > EN12453_GAP_ZONE_MM.max) largeGapTests += 1;
    try {
      const figures = forceFigures(kind, test);
      if ('code' in figures) {
        refused.push(test);
        problems.push({ path: `forceTests[${i}]`, code: figures.code, message: figures.message });
      } else {
        accepted.push(figures);
        acceptedPoints.add(pointOf(test));
        acceptedGaps.add(test.gapMm);
      }
    } catch (error) {
      refused.push(test);
      problems.push(refusal(`forceTests[${i}]`, error));
    }
  });
  const facts: Record<string, unknown> = {
    testCount: accepted.length,
    rejectedTraces: refused.length,
    largeGapTests,
    acceptedGapsMm: [...acceptedGaps].sort((a, b) => a - b),
  };
  // Points whose only test was refused: their figures are unknown, not absent.
  let smallUnknown = false;
  let largeUnknown = false;
  for (const test of refused) {
    if (acceptedPoints.has(pointOf(test))) continue;
    if (FOUR_HUNDRED_NEWTON_KINDS.has(kind) || test.gapMm <= EN12453_GAP_ZONE_MM.max) smallUnknown = true;
    else largeUnknown = true;
  }
  if (accepted.length === 0) return facts;
  const max = (pick: (f: ForceFigures) => number, from: ForceFigures[] = accepted) =>
    Math.max(...from.map(pick));
  if (!smallUnknown && !largeUnknown) {
    facts.worst = {
      peakN: max((f) => f.peakN),
      durationAbove150S: max((f) => f.durationAbove150S),
      staticN: max((f) => f.staticN),
      residualAt5sN: max((f) => f.residualAt5sN),
    };
  }
  const small = accepted.filter((f) => f.smallGap);
  const large = accepted.filter((f) => !f.smallGap);
  if (small.length > 0 && !smallUnknown) facts.smallGapMaxPeakN = max((f) => f.peakN, small);
  if (large.length > 0 && !largeUnknown) facts.largeGapMaxPeakN = max((f) => f.peakN, large);
  return facts;
}
