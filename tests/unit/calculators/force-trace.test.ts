import { describe, expect, it } from 'vitest';
import {
  EN12445_MIN_SAMPLE_RATE_HZ,
  EN12453_FORCE_LIMITS,
  evaluateForceTrace,
  ForceTraceError,
  type ForceSample,
} from '@/lib/rules/calculators/force-trace';

type Corner = [timeS: number, forceN: number];

/**
 * A synthetic meter recording: straight lines between (time s, force N) corners, sampled at
 * `rateHz` from 0 to `endS`. Corners sit on sample times, so linear interpolation between
 * samples reproduces the hand-computed crossings exactly.
 */
function recording({ endS, rateHz }: { endS: number; rateHz: number }, ...corners: Corner[]): ForceSample[] {
  const samples: ForceSample[] = [];
  const count = Math.round(endS * rateHz);
  for (let i = 0; i <= count; i += 1) {
    const t = i / rateHz;
    const next = corners.findIndex(([ct]) => ct >= t);
    let f: number;
    if (next === -1) f = corners[corners.length - 1]![1];
    else if (next === 0) f = corners[0]![1];
    else {
      const [t0, f0] = corners[next - 1]!;
      const [t1, f1] = corners[next]!;
      f = f0 + ((f1 - f0) * (t - t0)) / (t1 - t0);
    }
    samples.push({ t, f });
  }
  return samples;
}

/** A 6 s recording at 1 kHz. */
const trace = (...corners: Corner[]): ForceSample[] => recording({ endS: 6, rateHz: 1000 }, ...corners);

function refusal(run: () => unknown): ForceTraceError {
  try {
    run();
  } catch (error) {
    if (error instanceof ForceTraceError) return error;
    throw error;
  }
  throw new Error('expected a ForceTraceError');
}

const slideAt300 = { gateKind: 'slide' as const, gapMm: 300 };

describe('evaluateForceTrace: a trace within the limits', () => {
  // Triangular pulse: 0 → 350 N over 0.1 s (3500 N/s), down to 10 N at 0.6 s (−680 N/s), then 10 N.
  const pulse = trace([0, 0], [0.1, 350], [0.6, 10]);

  it('finds first contact, peak, time above 150 N, static and residual force', () => {
    // EN 12453:2017+A1:2021 via German accident insurers' committee / meter makers (secondary source, verify)
    const result = evaluateForceTrace(pulse, slideAt300);
    // first sample above 25 N: 3500·t > 25 → t > 0.00714 → 0.008 s (28 N)
    expect(result.firstContactAt).toBe(0.008);
    expect(result.peak).toBe(350);
    // peak at 0.100 s, i.e. 0.092 s after first contact
    expect(result.timeOfPeak).toBe(0.092);
    // up through 150 N at 150/3500 = 0.042857 s; down at 0.1 + 200/680 = 0.394118 s → 0.351261 s
    expect(result.durationAbove150).toBe(0.351);
    // first sample after 0.394118 s: 0.395 s → 350 − 680·0.295 = 149.4 N
    expect(result.staticForce).toBe(149.4);
    // 5 s after first contact (5.008 s) the force is 10 N
    expect(result.residualAt5s).toBe(10);
    expect(result.sampleRateHz).toBe(1000);
    expect(result.zone).toBe('gap_50_500');
    expect(result.limits.peakN).toBe(400);
    expect(result.pass).toEqual({
      peak: true,
      durationAbove150: true,
      staticForce: true,
      residualAt5s: true,
    });
    expect(result.overallPass).toBe(true);
  });

  it('holds the EN 12453 limits as named data', () => {
    expect(EN12453_FORCE_LIMITS.peakDynamicN).toEqual({ gap_50_500: 400, gap_over_500: 1400 });
    expect(EN12453_FORCE_LIMITS.maxDynamicDurationS).toBe(0.75);
    expect(EN12453_FORCE_LIMITS.maxStaticN).toBe(150);
    expect(EN12453_FORCE_LIMITS.maxResidualN).toBe(25);
    // EN 12445:2000 5.1.1
    expect(EN12445_MIN_SAMPLE_RATE_HZ).toBe(200);
  });
});

describe('evaluateForceTrace: each criterion can fail', () => {
  it('fails a 450 N peak where the gap is 50–500 mm but passes it over 500 mm', () => {
    // 0 → 450 N over 0.1 s, down to 10 N at 0.6 s (−880 N/s)
    const hard = trace([0, 0], [0.1, 450], [0.6, 10]);
    const near = evaluateForceTrace(hard, slideAt300);
    expect(near.peak).toBe(450);
    expect(near.pass.peak).toBe(false);
    expect(near.overallPass).toBe(false);
    // EN 12453: 1400 N where the gap is over 500 mm on slide and swing gates (secondary source)
    const wide = evaluateForceTrace(hard, { gateKind: 'slide', gapMm: 600 });
    expect(wide.zone).toBe('gap_over_500');
    expect(wide.limits.peakN).toBe(1400);
    expect(wide.pass.peak).toBe(true);
    // 150/4500 = 0.033333 s up, 0.1 + 300/880 = 0.440909 s down → 0.407576 s
    expect(wide.durationAbove150).toBe(0.408);
  });

  it('holds vertical doors and barriers to 400 N whatever the gap', () => {
    const hard = trace([0, 0], [0.1, 450], [0.6, 10]);
    const result = evaluateForceTrace(hard, { gateKind: 'barrier_arm', gapMm: 600 });
    expect(result.limits.peakN).toBe(400);
    expect(result.pass.peak).toBe(false);
    expect(evaluateForceTrace(hard, { gateKind: 'vertical_lift' }).zone).toBeNull();
  });

  it('passes a 400 N peak and fails a 400.1 N peak', () => {
    expect(evaluateForceTrace(trace([0, 0], [0.1, 400], [0.6, 10]), slideAt300).pass.peak).toBe(true);
    expect(evaluateForceTrace(trace([0, 0], [0.1, 400.1], [0.6, 10]), slideAt300).pass.peak).toBe(false);
  });

  it('fails a force held above 150 N for about a second', () => {
    // 0 → 300 N over 0.1 s, held to 1.0 s, down to 10 N at 1.1 s (−2900 N/s)
    const result = evaluateForceTrace(trace([0, 0], [0.1, 300], [1.0, 300], [1.1, 10]), slideAt300);
    // up at 150/3000 = 0.05 s, down at 1.0 + 150/2900 = 1.051724 s → 1.001724 s
    expect(result.durationAbove150).toBe(1.002);
    expect(result.pass.durationAbove150).toBe(false);
    // first sample after the fall: 1.052 s → 300 − 2900·0.052 = 149.2 N
    expect(result.staticForce).toBe(149.2);
    expect(result.pass.staticForce).toBe(true);
    expect(result.overallPass).toBe(false);
  });

  it('passes 0.75 s above 150 N and fails 0.751 s', () => {
    // square-ish pulses: up and down through 150 N exactly on sample times
    const at = (down: number) =>
      trace([0, 0], [0.1, 300], [down - 0.05, 300], [down, 150], [down + 0.001, 10]);
    // 0 → 300 over 0.1 s crosses 150 N at 0.05 s; the fall reaches 150 N at `down`
    expect(evaluateForceTrace(at(0.8), slideAt300).durationAbove150).toBe(0.75);
    expect(evaluateForceTrace(at(0.8), slideAt300).pass.durationAbove150).toBe(true);
    expect(evaluateForceTrace(at(0.801), slideAt300).pass.durationAbove150).toBe(false);
  });

  it('fails a gate that pushes again at 200 N after the impact', () => {
    // 0 → 350 N at 0.1 s, down to 100 N at 0.3 s (−1250 N/s), back up to 200 N at 0.5 s, held to 2 s, 20 N from 3 s
    const result = evaluateForceTrace(
      trace([0, 0], [0.1, 350], [0.3, 100], [0.5, 200], [2, 200], [3, 20]),
      slideAt300,
    );
    // dynamic period: 0.042857 s → 0.1 + 200/1250 = 0.26 s = 0.217 s
    expect(result.durationAbove150).toBe(0.217);
    expect(result.staticForce).toBe(200);
    expect(result.pass.staticForce).toBe(false);
    expect(result.residualAt5s).toBe(20);
    expect(result.pass.residualAt5s).toBe(true);
    expect(result.overallPass).toBe(false);
  });

  it('fails 40 N still pressing 5 s after first contact', () => {
    // 0 → 350 N over 0.1 s, down to 40 N at 0.6 s (−620 N/s), then 40 N
    const result = evaluateForceTrace(trace([0, 0], [0.1, 350], [0.6, 40]), slideAt300);
    expect(result.residualAt5s).toBe(40);
    expect(result.pass.residualAt5s).toBe(false);
    // first sample after 0.1 + 200/620 = 0.422581 s: 0.423 s → 350 − 620·0.323 = 149.74 N
    expect(result.staticForce).toBe(149.7);
    expect(result.pass.staticForce).toBe(true);
  });

  it('reads the residual force exactly 5 s after first contact', () => {
    // first contact 0.008 s; the force falls from 30 N to 20 N between 5.000 s and 5.016 s
    const result = evaluateForceTrace(trace([0, 0], [0.1, 350], [0.6, 30], [5, 30], [5.016, 20]), slideAt300);
    // at 5.008 s: halfway → 25 N, which is at most 25 N
    expect(result.residualAt5s).toBe(25);
    expect(result.pass.residualAt5s).toBe(true);
  });

  it('fails every time-based criterion for a gate that never lets go', () => {
    const result = evaluateForceTrace(trace([0, 0], [0.1, 300]), slideAt300);
    // up at 0.05 s, never down: above 150 N until the trace ends at 6 s
    expect(result.durationAbove150).toBe(5.95);
    expect(result.staticForce).toBe(300);
    expect(result.residualAt5s).toBe(300);
    expect(result.pass).toEqual({
      peak: true,
      durationAbove150: false,
      staticForce: false,
      residualAt5s: false,
    });
  });

  it("takes a ruleset's own limits", () => {
    const pulse = trace([0, 0], [0.1, 350], [0.6, 10]);
    expect(
      evaluateForceTrace(pulse, slideAt300, { peakDynamicN: { gap_50_500: 300, gap_over_500: 1400 } }).pass
        .peak,
    ).toBe(false);
    expect(evaluateForceTrace(pulse, slideAt300, { maxDynamicDurationS: 0.3 }).pass.durationAbove150).toBe(
      false,
    );
  });
});

describe('evaluateForceTrace: zones', () => {
  const pulse = trace([0, 0], [0.1, 350], [0.6, 10]);

  it('puts a 500 mm gap in the 50–500 mm zone and 500.1 mm over it', () => {
    expect(evaluateForceTrace(pulse, { gateKind: 'swing', gapMm: 500 }).zone).toBe('gap_50_500');
    expect(evaluateForceTrace(pulse, { gateKind: 'swing', gapMm: 500.1 }).zone).toBe('gap_over_500');
    expect(evaluateForceTrace(pulse, { gateKind: 'swing', gapMm: 50 }).zone).toBe('gap_50_500');
  });

  it('accepts the zone directly', () => {
    expect(evaluateForceTrace(pulse, { gateKind: 'swing', zone: 'gap_over_500' }).limits.peakN).toBe(1400);
  });

  it('refuses a swing trace without gap or zone, and a gap under 50 mm', () => {
    expect(refusal(() => evaluateForceTrace(pulse, { gateKind: 'swing' })).code).toBe('zone_unknown');
    expect(refusal(() => evaluateForceTrace(pulse, { gateKind: 'swing', gapMm: 30 })).code).toBe(
      'gap_not_covered',
    );
  });
});

describe('evaluateForceTrace: refuses doubtful recordings', () => {
  it('refuses a trace that stops before 5 s after first contact', () => {
    // first contact 0.008 s, trace ends at 5.0 s
    const short = recording({ endS: 5, rateHz: 1000 }, [0, 0], [0.1, 350], [0.6, 10]);
    const error = refusal(() => evaluateForceTrace(short, slideAt300));
    expect(error.code).toBe('too_short');
    expect(error.message).toMatch(/4\.992 s after first contact/);
  });

  it('accepts a trace ending exactly 5 s after first contact', () => {
    // first contact at 0.1 s (the first sample above 25 N), trace ends at 5.1 s
    const samples = recording({ endS: 5.1, rateHz: 1000 }, [0, 0], [0.099, 0], [0.1, 100], [0.2, 10]);
    expect(evaluateForceTrace(samples, slideAt300).firstContactAt).toBe(0.1);
  });

  it('refuses samples out of time order', () => {
    const samples = trace([0, 0], [0.1, 350], [0.6, 10]);
    [samples[10], samples[11]] = [samples[11]!, samples[10]!];
    const error = refusal(() => evaluateForceTrace(samples, slideAt300));
    expect(error.code).toBe('time_not_increasing');
    expect(error.message).toMatch(/Sample 12/);
  });

  it('refuses a repeated time stamp', () => {
    const samples = trace([0, 0], [0.1, 350], [0.6, 10]);
    samples[5] = { t: samples[4]!.t, f: samples[5]!.f };
    expect(refusal(() => evaluateForceTrace(samples, slideAt300)).code).toBe('time_not_increasing');
  });

  it('refuses a meter sampling at 100 Hz and accepts one at 200 Hz', () => {
    // EN 12445:2000 5.1.1: at least 200 Hz
    const at = (rateHz: number) => recording({ endS: 6, rateHz }, [0, 0], [0.1, 350], [0.6, 10]);
    expect(refusal(() => evaluateForceTrace(at(100), slideAt300)).code).toBe('sample_rate_too_low');
    expect(evaluateForceTrace(at(200), slideAt300).sampleRateHz).toBe(200);
  });

  it('refuses a dropout in an otherwise fast recording', () => {
    const samples = trace([0, 0], [0.1, 350], [0.6, 10]).filter((s) => s.t < 1 || s.t > 1.01);
    expect(refusal(() => evaluateForceTrace(samples, slideAt300)).code).toBe('sample_rate_too_low');
  });

  it('refuses a trace that never touches', () => {
    expect(refusal(() => evaluateForceTrace(trace([0, 10]), slideAt300)).code).toBe('no_contact');
  });

  it('refuses non-numeric samples and a lone sample', () => {
    expect(refusal(() => evaluateForceTrace([{ t: 0, f: 0 }], slideAt300)).code).toBe('too_short');
    expect(
      refusal(() =>
        evaluateForceTrace(
          [
            { t: 0, f: 0 },
            { t: 0.001, f: Number.NaN },
          ],
          slideAt300,
        ),
      ).code,
    ).toBe('invalid_sample');
  });
});
