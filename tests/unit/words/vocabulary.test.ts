import { describe, expect, it } from 'vitest';
import {
  auditActionLabel,
  count,
  daysFromNow,
  formatCalendarDate,
  humanise,
  rulesetLabel,
  statusLabel,
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
    expect(usageClassLabel(3)).toBe('usage class III');
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
});
