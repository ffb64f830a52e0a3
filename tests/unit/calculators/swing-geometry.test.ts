import * as math from 'mathjs';
import { describe, expect, it } from 'vitest';
import {
  assessSwingOperatorGeometry,
  leverArmMm,
  OPERATOR_LEAF_MIN_CLEARANCE_MM,
  pivotToPivotMm,
  type SwingOperatorGeometryInput,
} from '@/lib/rules/calculators/swing-geometry';

/**
 * Pull-to-open layout used for the hand-worked cases:
 * rear pivot P = (−A, B) = (−200, 150), so R = |P| = 250 (a 3-4-5 triangle ×50),
 * cos φ = −A/R = −0.8, sin φ = B/R = 0.6, φ = 143.130°; front bracket d = 1000 mm on the leaf.
 * Law of cosines: L² = d² + R² − 2·d·R·cos(φ − θ).
 */
const layout: SwingOperatorGeometryInput = {
  aMm: 200,
  bMm: 150,
  bracketFromHingeMm: 1000,
  retractedLengthMm: 850,
  strokeMm: 400,
  targetOpeningDeg: 90,
};

describe('swing operator geometry: hand-worked law of cosines', () => {
  const result = assessSwingOperatorGeometry(layout);

  it('works out the pivot-to-pivot length closed and open', () => {
    // θ = 0:  L² = 1 000 000 + 62 500 − 2·1000·250·(−0.8) = 1 462 500 → L = 1209.339
    //         (the same as (d + A)² + B² = 1200² + 150²)
    expect(result.closedPivotToPivotMm).toBe(1209.3);
    // θ = 90°: cos(φ − 90°) = sin φ = 0.6 → L² = 1 062 500 − 300 000 = 762 500 → L = 873.212
    //         (the same as A² + (d − B)² = 200² + 850²)
    expect(result.openPivotToPivotMm).toBe(873.2);
    expect(pivotToPivotMm(layout, 0)).toBeCloseTo(Math.sqrt(1_462_500), 9);
    expect(pivotToPivotMm(layout, 90)).toBeCloseTo(Math.sqrt(762_500), 9);
  });

  it('works out the extension beyond fully retracted', () => {
    // 1209.339 − 850 = 359.339; 873.212 − 850 = 23.212; stroke used 336.127
    expect(result.extensionAtClosedMm).toBe(359.3);
    expect(result.extensionAtOpenMm).toBe(23.2);
    expect(result.strokeNeededMm).toBe(336.1);
  });

  it('works out the lever arm about the hinge', () => {
    // lever arm = |P × F| / L; closed F = (1000, 0): |−150·1000| / 1209.339 = 124.035
    expect(result.leverArmAtClosedMm).toBe(124);
    // open F = (0, 1000): |−200·1000| / 873.212 = 229.040
    expect(result.leverArmAtOpenMm).toBe(229);
    expect(leverArmMm(layout, 0)).toBeCloseTo(150_000 / Math.sqrt(1_462_500), 9);
    expect(result.minLeverArmMm).toBe(124);
    expect(result.minLeverArmAtDeg).toBe(0);
  });

  it('finds the angles the stroke can reach', () => {
    // longest 1250 > 1209.339 reaches closed; shortest 850:
    // cos(φ − θ) = (1 062 500 − 722 500) / 500 000 = 0.68 → φ − θ = 47.156° → θ = 95.974°
    expect(result.reachableRangesDeg).toEqual([{ fromDeg: 0, toDeg: 96 }]);
    expect(result.closedReachable).toBe(true);
    expect(result.targetReachable).toBe(true);
    expect(result.swingReachable).toBe(true);
  });

  it('finds the dead centre where the ram points through the hinge', () => {
    // the front pivot lines up with P at θ = φ = 143.130°
    expect(result.deadCentreDeg).toBe(143.1);
    expect(result.passesDeadCentre).toBe(false);
    expect(
      assessSwingOperatorGeometry({ ...layout, strokeMm: 700, targetOpeningDeg: 150 }).passesDeadCentre,
    ).toBe(true);
  });

  it('flags an operator body 44.6 mm from the closed leaf as too close', () => {
    // body = 850 mm from P along PF: end E = P + 850/1209.339·(1200, −150) = (643.44, 44.57);
    // E is 44.57 mm above the closed leaf (the x-axis): closer than the hinge (124.0) or P (250)
    expect(result.chart.clearanceMm[0]).toBe(44.6);
    // common practice, no source: 2 in from the leaf
    expect(OPERATOR_LEAF_MIN_CLEARANCE_MM).toBe(50.8);
    expect(result.clearance.pass).toBe(false);
    expect(result.minClearanceMm).toBeLessThan(44.6);
  });

  it('samples every 0.5° from closed to the target for the charts', () => {
    expect(result.chart.angleDeg).toHaveLength(181);
    expect(result.chart.angleDeg[1]).toBe(0.5);
    expect(result.chart.angleDeg.at(-1)).toBe(90);
    expect(result.chart.extensionMm[0]).toBe(359.3);
    expect(result.chart.leverArmMm.at(-1)).toBe(229);
    const odd = assessSwingOperatorGeometry({ ...layout, targetOpeningDeg: 90.2 });
    expect(odd.chart.angleDeg.slice(-2)).toEqual([90, 90.2]);
  });
});

describe('swing operator geometry: stroke limits', () => {
  it('reports a stroke that cannot reach closed or the target opening', () => {
    // retracted 900, longest 1100 < 1209.339 (closed).
    // L = 1100: cos(φ − θ) = (1 062 500 − 1 210 000) / 500 000 = −0.295 → 107.157° → θ = 35.973°
    // L = 900:  cos(φ − θ) = (1 062 500 − 810 000) / 500 000 = 0.505 → 59.666° → θ = 83.464°
    const result = assessSwingOperatorGeometry({ ...layout, retractedLengthMm: 900, strokeMm: 200 });
    expect(result.reachableRangesDeg).toEqual([{ fromDeg: 36, toDeg: 83.5 }]);
    expect(result.closedReachable).toBe(false);
    expect(result.targetReachable).toBe(false);
    expect(result.swingReachable).toBe(false);
    expect(result.extensionAtClosedMm).toBe(309.3); // more than the 200 mm stroke
  });

  it('refuses impossible inputs', () => {
    expect(() => assessSwingOperatorGeometry({ ...layout, strokeMm: 0 })).toThrow(RangeError);
    expect(() => assessSwingOperatorGeometry({ ...layout, targetOpeningDeg: 190 })).toThrow(RangeError);
    expect(() => assessSwingOperatorGeometry({ ...layout, aMm: 0, bMm: 0 })).toThrow(RangeError);
  });
});

/** Independent model with mathjs: rotate the bracket with a rotation matrix, measure with math.distance. */
function independent(input: SwingOperatorGeometryInput, angleDeg: number) {
  const theta = math.unit(angleDeg, 'deg').toNumber('rad');
  const rotation = math.matrix([
    [math.cos(theta), -math.sin(theta)],
    [math.sin(theta), math.cos(theta)],
  ]);
  const side = input.bMm < 0 ? -1 : 1;
  const bracket = [input.bracketFromHingeMm, side * (input.bracketOffsetMm ?? 0)];
  const front = (math.multiply(rotation, bracket) as math.Matrix).toArray() as number[];
  const rear = [-input.aMm, input.bMm];
  const length = math.distance(front, rear) as number;
  const lever = math.distance([0, 0], rear, front) as number;
  return { front, rear, length, lever };
}

/** Brute-force clearance: many points along the body, each measured to the leaf segment (plain arithmetic). */
function bruteClearance(input: SwingOperatorGeometryInput, angleDeg: number): number {
  const { front, rear, length } = independent(input, angleDeg);
  const body = Math.min(input.operatorBodyLengthMm ?? input.retractedLengthMm, length);
  const [ux, uy] = [(front[0]! - rear[0]!) / length, (front[1]! - rear[1]!) / length];
  const [lx, ly] = [Math.cos((angleDeg * Math.PI) / 180), Math.sin((angleDeg * Math.PI) / 180)];
  let best = Number.POSITIVE_INFINITY;
  for (let i = 0; i <= 2000; i += 1) {
    const [px, py] = [rear[0]! + (ux * body * i) / 2000, rear[1]! + (uy * body * i) / 2000];
    const along = Math.max(0, px * lx + py * ly);
    best = Math.min(best, Math.hypot(px - along * lx, py - along * ly));
  }
  return best - (input.leafThicknessMm ?? 0) / 2 - (input.operatorHalfWidthMm ?? 0);
}

describe('swing operator geometry: cross-check with mathjs', () => {
  const layouts: Array<[string, SwingOperatorGeometryInput]> = [
    ['pull to open', layout],
    [
      'pull to open with an offset bracket and a thick leaf',
      {
        ...layout,
        bracketOffsetMm: 120,
        leafThicknessMm: 50,
        operatorHalfWidthMm: 40,
        operatorBodyLengthMm: 700,
      },
    ],
    [
      'push to open',
      {
        aMm: -200,
        bMm: -150,
        bracketFromHingeMm: 1000,
        retractedLengthMm: 800,
        strokeMm: 400,
        targetOpeningDeg: 100,
      },
    ],
  ];

  for (const [name, input] of layouts) {
    it(`matches an independent rotation-matrix model for ${name}`, () => {
      const result = assessSwingOperatorGeometry(input);
      result.chart.angleDeg.forEach((angle, i) => {
        if (i % 5 !== 0) return; // every 2.5° keeps the mathjs model fast
        const expected = independent(input, angle);
        expect(result.chart.pivotToPivotMm[i]).toBeCloseTo(expected.length, 1);
        expect(result.chart.extensionMm[i]).toBeCloseTo(expected.length - input.retractedLengthMm, 1);
        expect(result.chart.leverArmMm[i]).toBeCloseTo(expected.lever, 1);
      });
    });

    it(`matches a brute-force clearance for ${name}`, () => {
      const result = assessSwingOperatorGeometry(input);
      for (const angle of [0, 30, 60, 90]) {
        const i = result.chart.angleDeg.indexOf(angle);
        expect(Math.abs((result.chart.clearanceMm[i] as number) - bruteClearance(input, angle))).toBeLessThan(
          0.2,
        );
      }
    });
  }

  it('finds the far end of the reachable range where mathjs solves the law of cosines', () => {
    // θ = φ − acos((d² + R² − L²) / (2·d·R)) with L = retracted length
    const phi = math.atan2(150, -200);
    const R = math.norm([-200, 150]) as number;
    const c = (1000 ** 2 + R ** 2 - 850 ** 2) / (2 * 1000 * R);
    const far = math.unit(phi - (math.acos(c) as number), 'rad').toNumber('deg');
    expect(assessSwingOperatorGeometry(layout).reachableRangesDeg[0]!.toDeg).toBeCloseTo(far, 1);
  });

  it('lengthens the ram as a push-to-open gate opens', () => {
    // P = (200, −150); closed L = √(800² + 150²) = 813.941; open at 90°: √(200² + 1150²) = 1167.262
    const result = assessSwingOperatorGeometry(layouts[2]![1]);
    expect(result.closedPivotToPivotMm).toBe(813.9);
    expect(result.chart.pivotToPivotMm[180]).toBe(1167.3);
  });

  it('passes the 2 in clearance check with the offset bracket layout', () => {
    const result = assessSwingOperatorGeometry(layouts[1]![1]);
    expect(result.minClearanceMm).toBeGreaterThan(50.8);
    expect(result.clearance.pass).toBe(true);
    expect(assessSwingOperatorGeometry(layouts[1]![1], { minClearanceMm: 200 }).clearance.pass).toBe(false);
  });
});
