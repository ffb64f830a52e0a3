/**
 * iCalendar (RFC 5545) files for re-inspection due dates: all-day events written by the `ics`
 * package (text escaped, lines folded, CRLF line ends).
 *
 * Every text we put in a file (gate labels, client names, addresses, the organisation's name)
 * is typed by users, so it is cleaned first: RFC 5545 §3.3.11 allows no control characters in
 * TEXT, and a bare carriage return would end the content line in any reader and start a
 * property or component of the writer's choosing. Line breaks of every kind (CRLF, CR, LF)
 * become one LF, which the package writes as the escaped `\n`; other control characters
 * become a space. The package then escapes backslash, semicolon and comma in the event's
 * text. It does not escape those in the calendar name, so that one is escaped here.
 */
import { createEvents, type DateArray, type EventAttributes } from 'ics';

export interface DueEvent {
  /** Stable per gate and due date, so importing the file twice updates rather than duplicates. */
  uid: string;
  /** YYYY-MM-DD */
  date: string;
  summary: string;
  description?: string;
  location?: string;
}

/** Line breaks to LF, every other control character (tab aside) to a space. */
function plainText(value: string): string {
  // eslint-disable-next-line no-control-regex
  return value.replace(/\r\n?/g, '\n').replace(/[\u0000-\u0008\u000b-\u001f\u007f]/g, ' ');
}

/** RFC 5545 §3.3.11 TEXT escaping, for the one value the package leaves unescaped. */
function escapeText(value: string): string {
  return plainText(value)
    .replace(/\\/g, '\\\\')
    .replace(/;/g, '\\;')
    .replace(/,/g, '\\,')
    .replace(/\n/g, '\\n');
}

function dateArray(isoDate: string): DateArray {
  const [y, m, d] = isoDate.split('-').map(Number);
  return [y!, m!, d!];
}

function nextDay(isoDate: string): DateArray {
  const d = new Date(`${isoDate}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return [d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate()];
}

export function calendarOf(events: readonly DueEvent[], name: string, now = new Date()): string {
  const attributes: EventAttributes[] = events.map((event) => ({
    uid: plainText(event.uid).replace(/\s/g, ''),
    start: dateArray(event.date),
    end: nextDay(event.date),
    timestamp: now.getTime(),
    title: plainText(event.summary),
    ...(event.description ? { description: plainText(event.description) } : {}),
    ...(event.location ? { location: plainText(event.location) } : {}),
    transp: 'TRANSPARENT',
  }));
  const { error, value } = createEvents(attributes, {
    productId: '-//Latchwell//Re-inspection//EN',
    method: 'PUBLISH',
    calName: escapeText(name),
  });
  if (error || !value) throw error ?? new Error('the calendar could not be written');
  // The package folds with a tab; a space is as valid (RFC 5545 §3.1) and what most readers
  // and our earlier files use. No value holds a CR any more, so every CRLF here is a line end.
  return value.replaceAll('\r\n\t', '\r\n ');
}
