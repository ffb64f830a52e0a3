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
const FOUR_HUNDRED_NEWTON_KINDS: ReadonlySet<GateKind> = new Set(['barrier_arm', 'vertical_lift', 'vertical_pivot', 'overhead_pivot']);

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
    return { code: 'gap_not_covered', message: `A ${test.gapMm} mm gap is below the ${EN12453_GAP_ZONE_MM.min} mm measuring point` };
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

/** The force facts of one input's tests. */
export function forceFacts(kind: GateKind, tests: readonly ForceTest[], problems: EvidenceProblem[]): Record<string, unknown> {
  const accepted: ForceFigures[] = [];
  let rejected = 0;
  tests.forEach((test, i) => {
    try {
      const figures = forceFigures(kind, test);
      if ('code' in figures) {
        rejected += 1;
        problems.push({ path: `forceTests[${i}]`, code: figures.code, message: figures.message });
      } else accepted.push(figures);
    } catch (error) {
      rejected += 1;
      problems.push(refusal(`forceTests[${i}]`, error));
    }
  });
  const facts: Record<string, unknown> = { testCount: accepted.length, rejectedTraces: rejected };
  if (accepted.length === 0) return facts;
  const max = (pick: (f: ForceFigures) => number, from: ForceFigures[] = accepted) => Math.max(...from.map(pick));
  facts.worst = {
    peakN: max((f) => f.peakN),
    durationAbove150S: max((f) => f.durationAbove150S),
    staticN: max((f) => f.staticN),
    residualAt5sN: max((f) => f.residualAt5sN),
  };
  const small = accepted.filter((f) => f.smallGap);
  const large = accepted.filter((f) => !f.smallGap);
  if (small.length > 0) facts.smallGapMaxPeakN = max((f) => f.peakN, small);
  if (large.length > 0) facts.largeGapMaxPeakN = max((f) => f.peakN, large);
  return facts;
}

