/** The re-inspection calendar files and the archive's CSV cells, as other programs will read them. */
import { describe, expect, it } from 'vitest';
import { csvCell, csvRow } from '@/lib/server/csv';
import { calendarOf } from '@/lib/server/ics';

describe('re-inspection calendar', () => {
  const ics = calendarOf(
    [
      {
        uid: 'reinspection-g1-2027-03-12@latchwell',
        date: '2027-03-12',
        summary: 'Gate re-inspection due: Yard gate, north side; Moss & Pell',
        description:
          'Line one\nLine two, with "quotes" and a very long tail that goes on past the seventy-five octet limit of a content line',
      },
    ],
    'Quillmoor: re-inspection',
    new Date('2026-12-02T10:00:00Z'),
  );
  const lines = ics.split('\r\n');

  it('is an all-day event on the due date, ending the next day, with CRLF line ends', () => {
    expect(ics.endsWith('\r\n')).toBe(true);
    expect(lines).toContain('DTSTART;VALUE=DATE:20270312');
    expect(lines).toContain('DTEND;VALUE=DATE:20270313');
    expect(lines).toContain('DTSTAMP:20261202T100000Z');
  });

  it('escapes commas, semicolons and new lines in text and folds lines at 75 octets', () => {
    expect(ics).toContain('SUMMARY:Gate re-inspection due: Yard gate\\, north side\\; Moss & Pell');
    expect(lines.every((l) => Buffer.byteLength(l) <= 75)).toBe(true);
    const unfolded = ics.replace(/\r\n /g, '');
    expect(unfolded).toContain(
      'DESCRIPTION:Line one\\nLine two\\, with "quotes" and a very long tail that goes on past the seventy-five octet limit of a content line',
    );
  });
});

/** Every content line is a property (NAME, NAME;PARAM=…, or X-NAME, then ':' ) or a folded continuation. */
function expectWellFormed(ics: string) {
  expect(ics.endsWith('\r\n')).toBe(true);
  const lines = ics.slice(0, -2).split('\r\n');
  for (const line of lines) {
    expect(line, JSON.stringify(line)).not.toMatch(/[\r\n]/);
    expect(line, JSON.stringify(line)).toMatch(/^(?:[A-Za-z0-9-]+(?:;[A-Za-z0-9-]+=[^:;]*)*:|[ \t])/);
  }
  return ics.replace(/\r\n[ \t]/g, '').split('\r\n');
}

describe('re-inspection calendar with hostile text', () => {
  // [label, its SUMMARY value as RFC 5545 §3.3.11 escapes it]
  const hostile: Array<[string, string]> = [
    ['North\rBEGIN:VEVENT', 'North\\nBEGIN:VEVENT'],
    ['North\nBEGIN:VEVENT', 'North\\nBEGIN:VEVENT'],
    [
      'North\r\nBEGIN:VEVENT\r\nSUMMARY:Injected\r\nEND:VEVENT',
      'North\\nBEGIN:VEVENT\\nSUMMARY:Injected\\nEND:VEVENT',
    ],
    ['North\r\n BEGIN:VEVENT', 'North\\n BEGIN:VEVENT'],
    ['a,b;c\\d', 'a\\,b\\;c\\\\d'],
    ['bell\u0007 and \u0000nul', 'bell  and  nul'],
  ];
  for (const [label, escaped] of hostile) {
    it(`keeps ${JSON.stringify(label)} inside one escaped SUMMARY`, () => {
      const ics = calendarOf(
        [
          {
            uid: 'reinspection-g2-2027-01-05@latchwell',
            date: '2027-01-05',
            summary: label,
            description: label,
            location: label,
          },
        ],
        `Org ${label}`,
        new Date('2026-12-02T10:00:00Z'),
      );
      const lines = expectWellFormed(ics);
      expect(lines.filter((l) => l === 'BEGIN:VEVENT')).toHaveLength(1);
      expect(lines.filter((l) => l === 'END:VEVENT')).toHaveLength(1);
      expect(lines.filter((l) => l.startsWith('SUMMARY'))).toHaveLength(1);
      expect(lines).toContain(`SUMMARY:${escaped}`);
      expect(lines).toContain(`DESCRIPTION:${escaped}`);
      expect(lines).toContain(`LOCATION:${escaped}`);
      expect(lines).toContain(`X-WR-CALNAME:Org ${escaped}`);
    });
  }
});

describe('CSV cells', () => {
  it('quotes separators and quotes, and defuses spreadsheet formulas', () => {
    expect(csvCell('Moss, Pell')).toBe('"Moss, Pell"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvCell('+1 555')).toBe("'+1 555");
    expect(csvCell(-3)).toBe('-3');
    expect(csvRow(['a', null, 2])).toBe('a,,2\r\n');
  });
});
