import { describe, expect, it } from 'vitest';
import {
  auditActionLabel,
  count,
  daysFromNow,
  formatCalendarDate,
  formatDay,
  formatDayTime,
  fieldWords,
  formatLongDate,
  isoDayIn,
  plainValue,
  humanise,
  rulesetLabel,
  statusLabel,
  usageClassesText,
  usageClassLabel,
  verdictLabel,
} from '@/lib/vocabulary';

describe('vocabulary', () => {
  it('agrees a count with its noun', () => {
    expect(count(0, 'attachment')).toBe('0 attachments');
    expect(count(1, 'attachment')).toBe('1 attachment');
    expect(count(2, 'attachment')).toBe('2 attachments');
    expect(count(1, 'try', 'tries')).toBe('1 try');
    expect(count(8, 'try', 'tries')).toBe('8 tries');
    expect(count(12500, 'assessment')).toBe('12,500 assessments');
  });

  it('says how far a day is, on both sides of today', () => {
    expect(daysFromNow(1)).toBe('in 1 day');
    expect(daysFromNow(365)).toBe('in 365 days');
    expect(daysFromNow(0)).toBe('today');
    expect(daysFromNow(-1)).toBe('1 day overdue');
    expect(daysFromNow(-53)).toBe('53 days overdue');
  });

  it('never shows a code: labels for statuses, verdicts, classes, audit actions, and a readable fallback', () => {
    expect(statusLabel('awaiting_signature')).toBe('Awaiting signature');
    expect(statusLabel('some_new_state')).toBe('Some new state');
    expect(verdictLabel('withdraw')).toBe('Take out of automatic use');
    expect(verdictLabel('remedy')).toBe('Fix by a date');
    expect(verdictLabel('clear')).toBe('No hazard found above minor');
    expect(verdictLabel(null)).toBe('Not scored yet');
    expect(usageClassLabel(3)).toBe('Class III');
    expect(usageClassesText([1, 2, 3, 4])).toBe('Classes I–IV');
    expect(usageClassesText([3, 2])).toBe('Classes II and III');
    expect(usageClassesText([2])).toBe('Class II');
    expect(auditActionLabel('assessment.sent_for_signature')).toBe('Sent for signature');
    expect(auditActionLabel('gate.moved_site')).toBe('Gate moved site');
    expect(humanise('needs_info')).toBe('Needs info');
    expect(rulesetLabel({ family: 'north-american-gate', version: '2026.1', title: null })).toBe(
      'North american gate 2026.1',
    );
  });

  it('writes a calendar date without shifting it by a time zone', () => {
    expect(formatCalendarDate('2027-11-17')).toBe('Nov 17, 2027');
    expect(formatCalendarDate('2027-01-01')).toBe('Jan 1, 2027');
    expect(formatCalendarDate(null)).toBe('—');
  });

  it("shows a moment in the organisation's time zone, one format per context", () => {
    // 2026-11-18 04:30 UTC is still the 17th in Denver (UTC-7 in November).
    const moment = '2026-11-18T04:30:00Z';
    expect(formatDay(moment, 'America/Denver')).toBe('Nov 17, 2026');
    expect(formatDay(moment, 'Europe/Berlin')).toBe('Nov 18, 2026');
    expect(formatDayTime(moment, 'America/Denver')).toBe('Nov 17, 2026, 9:30 PM MST');
    expect(formatLongDate(moment, 'America/Denver')).toBe('November 17, 2026');
    expect(isoDayIn('America/Denver', new Date(moment))).toBe('2026-11-17');
    // A zone the runtime does not know falls back to UTC rather than breaking the page.
    expect(formatDay(moment, 'Not/AZone')).toBe('Nov 18, 2026');
    expect(formatDay(null, 'UTC')).toBe('—');
  });

  it('writes ruleset fields and values in words, never codes or rule ids', () => {
    expect(fieldWords('params.minClearanceMm')).toBe('min clearance');
    expect(fieldWords('rules.pinch.fixed-objects.params.minClearanceMm')).toBe('min clearance');
    expect(fieldWords('appliesTo.gateKinds')).toBe('applies to › gate kinds');
    expect(plainValue('lower_inclusive')).toBe('lower inclusive');
    expect(plainValue('pinch.fixed-objects')).toBe('pinch and crush points › fixed objects');
    expect(plainValue([{ zone: 'open_side', rule: 'pinch.hinge-side' }])).toBe(
      'zone: open side, rule: pinch and crush points › hinge side',
    );
    expect(plainValue(406.4, 'mm')).toMatch(/^406\.4 mm/);
    expect(plainValue('north-american-gate-local', undefined, 'derivedFrom.family')).toBe(
      'North american gate local',
    );
  });
});
