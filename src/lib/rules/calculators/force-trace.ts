/**
 * Judges a force–time trace recorded with a force meter at a closing edge against the
 * EN 12453 / EN 12445 limits: peak dynamic force, time above 150 N, static force and
 * residual force 5 s after first contact.
 */
import type { GateKind } from './gate-kind';
import { ForceTraceError } from './force-trace-error';
import { requireFinite, roundN, roundS, roundTo } from './numbers';

// The error and the CSV reader belong to this concept; callers import them from here.
export { ForceTraceError, type ForceTraceErrorCode } from './force-trace-error';
export { HEADERLESS_TRACE_UNITS, parseForceTraceCsv, type ForceTraceCsvOptions } from './force-trace-csv';

/** One reading: time in seconds, force in newtons. */
export interface ForceSample {
  t: number;
  f: number;
}

/** Measuring-point zone by the gap left at the closing edge. */
export type ForceZone = 'gap_50_500' | 'gap_over_500';

/**
 * EN 12453:2017+A1:2021 force limits (sliding and hinged gates by gap; vertical doors and
 * barriers 400 N in both zones). Secondary sources (German accident insurers' committee,
 * force-meter makers); verify against the current edition.
 */
export const EN12453_FORCE_LIMITS = Object.freeze({
  peakDynamicN: Object.freeze({ gap_50_500: 400, gap_over_500: 1400 }),
  peakDynamicVerticalOrBarrierN: 400,
  dynamicThresholdN: 150,
  maxDynamicDurationS: 0.75,
  maxStaticN: 150,
  maxResidualN: 25,
  residualAfterS: 5,
});

/** EN 12453 gap zones, mm: 50–500 inclusive, then over 500 (measuring points at 50, 300, 500 mm). Secondary source. */
export const EN12453_GAP_ZONE_MM = Object.freeze({ min: 50, max: 500 });

/** EN 12445:2000 5.1.1: the measuring device samples at least 200 Hz. */
export const EN12445_MIN_SAMPLE_RATE_HZ = 200;

/**
 * First contact = first sample above 25 N: the bottom of the measuring range EN 12445 5.1.1
 * asks of the device (25–2000 N), so the first reading the meter vouches for. Our reading of
 * the standard; verify.
 */
export const FIRST_CONTACT_THRESHOLD_N = 25;

/** Kinds judged with the vertical-door/barrier limit (400 N whatever the gap). */
const VERTICAL_OR_BARRIER: readonly GateKind[] = [
  'barrier_arm',
  'vertical_lift',
  'vertical_pivot',
  'overhead_pivot',
];

/** Timing tolerance for float noise in recorded times (1 µs). */
const TIME_EPSILON_S = 1e-6;

/** Limits a ruleset may pass instead of the EN 12453 / EN 12445 defaults. */
export interface ForceTraceLimits {
  peakDynamicN: Record<ForceZone, number>;
  peakDynamicVerticalOrBarrierN: number;
  dynamicThresholdN: number;
  maxDynamicDurationS: number;
  maxStaticN: number;
  maxResidualN: number;
  residualAfterS: number;
  minSampleRateHz: number;
  firstContactThresholdN: number;
}

/** Where the trace was measured: the gate kind and the gap at the measuring point. */
export interface ForceTraceContext {
  gateKind: GateKind;
  /** Gap at the measuring point, mm; picks the zone unless `zone` is given. */
  gapMm?: number | null;
  zone?: ForceZone | null;
}

/** Figures read off the trace and the verdict per criterion; forces in N, times in s. */
export interface ForceTraceResult {
  gateKind: GateKind;
  zone: ForceZone | null;
  sampleCount: number;
  /** Mean sampling rate, Hz. */
  sampleRateHz: number;
  /** Time of first contact on the trace's own clock, s. */
  firstContactAt: number;
  /** Peak dynamic force, N. */
  peak: number;
  /** Time of the peak after first contact, s. */
  timeOfPeak: number;
  /** Length of the dynamic period: from the force first rising above 150 N to it first falling back to 150 N or below, s. */
  durationAbove150: number;
  /** Largest force after the dynamic period up to 5 s after first contact, N. */
  staticForce: number;
  /** Force 5 s after first contact (interpolated), N. */
  residualAt5s: number;
  limits: { peakN: number; maxDurationS: number; maxStaticN: number; maxResidualN: number };
  pass: { peak: boolean; durationAbove150: boolean; staticForce: boolean; residualAt5s: boolean };
  overallPass: boolean;
}

function resolveZone(context: ForceTraceContext, bounds = EN12453_GAP_ZONE_MM): ForceZone | null {
  if (context.zone) return context.zone;
  const gap = context.gapMm;
  if (gap === null || gap === undefined) {
    if (VERTICAL_OR_BARRIER.includes(context.gateKind)) return null;
    throw new ForceTraceError(
      'zone_unknown',
      'Give the gap at the measuring point (or its zone) for a swing or slide gate',
    );
  }
  requireFinite('gapMm', gap);
  if (gap < bounds.min) {
    throw new ForceTraceError(
      'gap_not_covered',
      `A ${gap} mm gap is below the ${bounds.min} mm measuring point`,
    );
  }
  return gap <= bounds.max ? 'gap_50_500' : 'gap_over_500';
}

function validateSamples(samples: readonly ForceSample[], minRateHz: number): void {
  if (samples.length < 2) throw new ForceTraceError('too_short', 'A trace needs at least two samples');
  const maxStep = 1 / minRateHz + TIME_EPSILON_S;
  samples.forEach((sample, i) => {
    if (!Number.isFinite(sample.t) || !Number.isFinite(sample.f)) {
      throw new ForceTraceError('invalid_sample', `Sample ${i + 1} is not a pair of finite numbers`);
    }
    const previous = samples[i - 1];
    if (!previous) return;
    if (sample.t <= previous.t) {
      throw new ForceTraceError(
        'time_not_increasing',
        `Sample ${i + 1}: time ${sample.t} s does not follow ${previous.t} s`,
      );
    }
    if (sample.t - previous.t > maxStep) {
      throw new ForceTraceError(
        'sample_rate_too_low',
        `Sample ${i + 1}: ${roundS(sample.t - previous.t)} s after the previous one; the meter must sample at ${minRateHz} Hz or faster`,
      );
    }
  });
}

/** Force at time t by linear interpolation between neighbouring samples (t within the trace). */
function forceAt(samples: readonly ForceSample[], t: number): number {
  const hi = samples.findIndex((sample) => sample.t >= t);
  if (hi <= 0) return (samples[Math.max(hi, 0)] as ForceSample).f;
  const a = samples[hi - 1] as ForceSample;
  const b = samples[hi] as ForceSample;
  return a.f + ((b.f - a.f) * (t - a.t)) / (b.t - a.t);
}

/** Time at which the segment from sample i-1 to i crosses `level` (sample i when i is 0). */
function crossingTime(samples: readonly ForceSample[], i: number, level: number): number {
  const b = samples[i] as ForceSample;
  const a = samples[i - 1];
  if (!a || a.f === b.f) return b.t;
  return a.t + ((level - a.f) * (b.t - a.t)) / (b.f - a.f);
}

/**
 * Evaluates one measuring point's trace. Refuses (ForceTraceError) traces that are unordered,
 * sampled slower than the meter must, never touch, or stop before 5 s after first contact.
 */
export function evaluateForceTrace(
  samples: readonly ForceSample[],
  context: ForceTraceContext,
  limits: Partial<ForceTraceLimits> = {},
): ForceTraceResult {
  const l: ForceTraceLimits = {
    ...EN12453_FORCE_LIMITS,
    minSampleRateHz: EN12445_MIN_SAMPLE_RATE_HZ,
    firstContactThresholdN: FIRST_CONTACT_THRESHOLD_N,
    ...limits,
    peakDynamicN: { ...EN12453_FORCE_LIMITS.peakDynamicN, ...limits.peakDynamicN },
  };
  const zone = resolveZone(context);
  validateSamples(samples, l.minSampleRateHz);

  const contactIndex = samples.findIndex((sample) => sample.f > l.firstContactThresholdN);
  if (contactIndex < 0) {
    throw new ForceTraceError('no_contact', `The force never rises above ${l.firstContactThresholdN} N`);
  }
  const first = samples[0] as ForceSample;
  const last = samples[samples.length - 1] as ForceSample;
  const contactAt = (samples[contactIndex] as ForceSample).t;
  const residualAt = contactAt + l.residualAfterS;
  if (last.t < residualAt - TIME_EPSILON_S) {
    throw new ForceTraceError(
      'too_short',
      `The trace ends ${roundS(last.t - contactAt)} s after first contact; it must run ${l.residualAfterS} s`,
    );
  }

  let peakIndex = contactIndex;
  samples.forEach((sample, i) => {
    if (sample.f > (samples[peakIndex] as ForceSample).f) peakIndex = i;
  });
  const peakSample = samples[peakIndex] as ForceSample;

  const threshold = l.dynamicThresholdN;
  const upIndex = samples.findIndex((sample) => sample.f > threshold);
  let duration = 0;
  let dynamicEnd = peakSample.t;
  if (upIndex >= 0) {
    const upAt = crossingTime(samples, upIndex, threshold);
    const downIndex = samples.findIndex((sample, i) => i > upIndex && sample.f <= threshold);
    const downAt = downIndex >= 0 ? crossingTime(samples, downIndex, threshold) : last.t;
    duration = downAt - upAt;
    // A force that never falls back has no end to its dynamic period: what follows the allowed time is static.
    dynamicEnd = downIndex >= 0 ? downAt : upAt + l.maxDynamicDurationS;
  }

  const windowEnd = Math.min(residualAt, last.t);
  let staticForce = forceAt(samples, windowEnd);
  for (const sample of samples) {
    if (sample.t > dynamicEnd && sample.t <= windowEnd) staticForce = Math.max(staticForce, sample.f);
  }

  const peakLimit =
    zone === null || VERTICAL_OR_BARRIER.includes(context.gateKind)
      ? l.peakDynamicVerticalOrBarrierN
      : l.peakDynamicN[zone];
  const result = {
    peak: roundN(peakSample.f),
    timeOfPeak: roundS(peakSample.t - contactAt),
    durationAbove150: roundS(duration),
    staticForce: roundN(staticForce),
    residualAt5s: roundN(forceAt(samples, Math.min(residualAt, last.t))),
  };
  const pass = {
    peak: result.peak <= peakLimit,
    durationAbove150: result.durationAbove150 <= l.maxDynamicDurationS,
    staticForce: result.staticForce <= l.maxStaticN,
    residualAt5s: result.residualAt5s <= l.maxResidualN,
  };
  return {
    gateKind: context.gateKind,
    zone,
    sampleCount: samples.length,
    sampleRateHz: roundTo((samples.length - 1) / (last.t - first.t), 1),
    firstContactAt: roundS(contactAt),
    ...result,
    limits: {
      peakN: peakLimit,
      maxDurationS: l.maxDynamicDurationS,
      maxStaticN: l.maxStaticN,
      maxResidualN: l.maxResidualN,
    },
    pass,
    overallPass: pass.peak && pass.durationAbove150 && pass.staticForce && pass.residualAt5s,
  };
}
