import { describe, expect, it } from 'vitest';
import { evaluateForceTrace, ForceTraceError, parseForceTraceCsv } from '@/lib/rules/calculators/force-trace';

function refusal(run: () => unknown): ForceTraceError {
  try {
    run();
  } catch (error) {
    if (error instanceof ForceTraceError) return error;
    throw error;
  }
  throw new Error('expected a ForceTraceError');
}

describe('parseForceTraceCsv', () => {
  it('reads comma-separated seconds and newtons under a header', () => {
    const samples = parseForceTraceCsv('time_s,force_N\n0.000,0\n0.005,12.5\n0.010,30\n');
    expect(samples).toEqual([
      { t: 0, f: 0 },
      { t: 0.005, f: 12.5 },
      { t: 0.01, f: 30 },
    ]);
  });

  it('reads semicolons, decimal commas and milliseconds from the header', () => {
    const samples = parseForceTraceCsv('Zeit [ms];Kraft [N]\r\n0;0\r\n5;12,5\r\n10;30,25\r\n');
    expect(samples).toEqual([
      { t: 0, f: 0 },
      { t: 0.005, f: 12.5 },
      { t: 0.01, f: 30.25 },
    ]);
  });

  it('reads a file without a header as seconds, or as the unit the caller names', () => {
    expect(parseForceTraceCsv('0\t0\n0.005\t40\n')).toEqual([
      { t: 0, f: 0 },
      { t: 0.005, f: 40 },
    ]);
    expect(parseForceTraceCsv('0,0\n5,40\n', { timeUnit: 'ms' })[1]).toEqual({ t: 0.005, f: 40 });
  });

  it("lets the header unit win over the caller's default", () => {
    expect(parseForceTraceCsv('t (s),F (N)\n0.5,1\n', { timeUnit: 'ms' })).toEqual([{ t: 0.5, f: 1 }]);
  });

  it('finds time and force by their header names in any column order', () => {
    const samples = parseForceTraceCsv('channel,force (N),time (ms)\n1,100,0\n1,120,5\n');
    expect(samples).toEqual([
      { t: 0, f: 100 },
      { t: 0.005, f: 120 },
    ]);
  });

  it('converts forces recorded in kN or lbf to newtons', () => {
    expect(parseForceTraceCsv('t [s];F [kN]\n0;0,4\n')[0]!.f).toBe(400);
    expect(parseForceTraceCsv('time_s,force_lbf\n0,1\n')[0]!.f).toBe(4.4482216152605);
  });

  it('honours quoted fields, a byte-order mark, blank lines and comment lines', () => {
    const text = '\uFEFF# meter 7, calibrated\n"time (s)";"force (N)"\n\n"0,000";"1,5"\n"0,005";"2,5"\n';
    expect(parseForceTraceCsv(text)).toEqual([
      { t: 0, f: 1.5 },
      { t: 0.005, f: 2.5 },
    ]);
  });

  it('names the line of a malformed row', () => {
    const error = refusal(() => parseForceTraceCsv('time_s,force_N\n0,0\n0.005,12\n0.010,abc\n'));
    expect(error.code).toBe('malformed_line');
    expect(error.line).toBe(4);
    expect(error.message).toMatch(/^Line 4:/);
  });

  it('names the line of a row with a missing force', () => {
    const error = refusal(() => parseForceTraceCsv('0;0\n0,005\n'));
    expect(error.line).toBe(2);
  });

  it('refuses a decimal comma in a comma-separated file as malformed', () => {
    // "0,005,12,5" cannot be read unambiguously
    expect(refusal(() => parseForceTraceCsv('0,005,12,5\n')).code).toBe('malformed_line');
  });

  it('refuses a unit it does not know rather than guess', () => {
    const error = refusal(() => parseForceTraceCsv('time [min],force [N]\n0,0\n'));
    expect(error.code).toBe('unknown_unit');
    expect(error.line).toBe(1);
  });

  it('refuses an empty file and a header without samples', () => {
    expect(refusal(() => parseForceTraceCsv('\n\n')).code).toBe('empty_trace');
    expect(refusal(() => parseForceTraceCsv('time_s,force_N\n')).code).toBe('empty_trace');
  });

  it('gives the same verdict from the exported file as from the samples', () => {
    // 0 → 350 N over 0.1 s, down to 10 N at 0.6 s, 10 N to 6 s, written at 1 kHz in ms with decimal commas
    const rows = ['Zeit [ms];Kraft [N]'];
    for (let ms = 0; ms <= 6000; ms += 1) {
      const t = ms / 1000;
      const f = t <= 0.1 ? 3500 * t : t <= 0.6 ? 350 - 680 * (t - 0.1) : 10;
      rows.push(`${ms};${f.toFixed(2).replace('.', ',')}`);
    }
    const result = evaluateForceTrace(parseForceTraceCsv(rows.join('\n')), { gateKind: 'slide', gapMm: 300 });
    expect(result).toMatchObject({
      peak: 350,
      timeOfPeak: 0.092,
      durationAbove150: 0.351,
      residualAt5s: 10,
      overallPass: true,
    });
  });
});
