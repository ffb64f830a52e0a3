import { describe, expect, it } from 'vitest';
import { bandEdgesSentence, bandRows, reinspectionLines, scoringLines } from '@/lib/vocabulary';
import { shipped } from '../rules/support/shipped';

describe('the ruleset page says how bands, areas and re-inspection work', () => {
  // HRN bands as widely reprinted (secondary source): 10–50 significant, 50–100 high, over 1000 unacceptable
  it('writes the band edges of 2026.2 as lower-inclusive: 50 is high', () => {
    const hrn = shipped('north-american-gate', '2026.2').version.hrn;
    expect(bandEdgesSentence(hrn)).toMatch(/higher band/);
    const rows = bandRows(hrn);
    expect(rows[0]).toEqual({ key: 'negligible', label: 'Negligible', range: 'under 1' });
    expect(rows.find((r) => r.key === 'high')!.range).toBe('from 50 up to but not including 100');
    expect(rows.at(-1)!.range).toBe('1000 and over');
  });

  it('writes the edges of 2026.1 as the engine has always applied them: 50 is significant', () => {
    const hrn = shipped('north-american-gate', '2026.1').version.hrn;
    expect(bandEdgesSentence(hrn)).toMatch(/lower band/);
    expect(bandRows(hrn).find((r) => r.key === 'significant')!.range).toBe('over 10 up to and including 50');
    expect(bandRows(hrn).at(-1)!.range).toBe('over 1000');
  });

  it('lists the area cap, the likelihood by severity and the re-inspection plan of 2026.2', () => {
    const version = shipped('european-powered-gate', '2026.2').version;
    expect(scoringLines(version).join(' ')).toContain('at most 25');
    expect(scoringLines(version).join(' ')).toContain('critical 1 step more likely');
    // common practice, no source
    expect(reinspectionLines(version)).toEqual([
      'Clear: class 1: 365 days, class 2: 180 days, class 3: 180 days, class 4: 180 days.',
      'Remedy: class 1: 90 days, class 2: 60 days, class 3: 60 days, class 4: 60 days.',
      'Withdraw: when the fixes are reported (no calendar date while the gate is out of automatic use).',
    ]);
    expect(reinspectionLines(shipped('european-powered-gate', '2026.1').version)).toEqual([]);
  });
});
