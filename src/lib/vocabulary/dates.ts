/**
 * Dates and times as people read them, always in the organisation's time zone (stored as
 * timestamptz, shown locally). One format per context:
 * - `formatDay`: a date in a list or table ("Nov 17, 2026");
 * - `formatDayTime`: an event or a deadline to the minute, with the zone ("Nov 17, 2026, 3:05 PM MST"):
 *   audit events, a signing link's expiry, mail received;
 * - `formatLongDate`: a date in a report or an e-mail ("November 17, 2026");
 * - `formatLongDateTime`: a moment in a report, to the second ("Nov 17, 2026, 03:05:09 PM MST");
 * - `formatCalendarDate`: a date with no time zone of its own (`YYYY-MM-DD`, e.g. a due date);
 * - `formatMonth`: a point on a trend ("Nov 2026").
 */

type When = string | Date | null | undefined;

const formatters = new Map<string, Intl.DateTimeFormat>();

/** The zone itself when the runtime knows it, else UTC: a bad stored zone never breaks a page. */
export function safeTimeZone(timeZone: string | null | undefined): string {
  if (!timeZone) return 'UTC';
  try {
    new Intl.DateTimeFormat('en-US', { timeZone });
    return timeZone;
  } catch {
    return 'UTC';
  }
}

function formatter(timeZone: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const zone = safeTimeZone(timeZone);
  const key = `${zone}|${JSON.stringify(options)}`;
  let cached = formatters.get(key);
  if (!cached) {
    cached = new Intl.DateTimeFormat('en-US', { ...options, timeZone: zone });
    formatters.set(key, cached);
  }
  return cached;
}

function format(when: When, timeZone: string, options: Intl.DateTimeFormatOptions): string {
  if (!when) return '—';
  const date = when instanceof Date ? when : new Date(when);
  if (Number.isNaN(date.getTime())) return '—';
  return formatter(timeZone, options).format(date);
}

/** A date in a list or table: "Nov 17, 2026". */
export function formatDay(when: When, timeZone: string): string {
  return format(when, timeZone, { dateStyle: 'medium' });
}

/** An event or a deadline to the minute, with the zone: "Nov 17, 2026, 3:05 PM MST". */
export function formatDayTime(when: When, timeZone: string): string {
  return format(when, timeZone, {
    year: 'numeric',
    month: 'short',
    day: 'numeric',
    hour: 'numeric',
    minute: '2-digit',
    timeZoneName: 'short',
  });
}

/** A date in a report or an e-mail: "November 17, 2026". */
export function formatLongDate(when: When, timeZone: string): string {
  return format(when, timeZone, { year: 'numeric', month: 'long', day: 'numeric' });
}

/** A moment in a report, to the second, with the zone: "Nov 17, 2026, 03:05:09 PM MST". */
export function formatLongDateTime(when: When, timeZone: string): string {
  return format(when, timeZone, {
    year: 'numeric',
    month: 'short',
    day: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
    timeZoneName: 'short',
  });
}

/** A point on a trend: "Nov 2026". */
export function formatMonth(when: When, timeZone: string): string {
  return format(when, timeZone, { month: 'short', year: 'numeric' });
}

/** A calendar date stored as `YYYY-MM-DD` (no time zone of its own), e.g. a due date: "Nov 17, 2027". */
export function formatCalendarDate(isoDate: string | null | undefined): string {
  if (!isoDate) return '—';
  return formatDay(`${isoDate.slice(0, 10)}T00:00:00Z`, 'UTC');
}

/** A day in the zone as `YYYY-MM-DD`, for comparing with calendar dates and naming files. */
export function isoDayIn(timeZone: string, when: Date = new Date()): string {
  const parts = Object.fromEntries(
    formatter(timeZone, { year: 'numeric', month: '2-digit', day: '2-digit' })
      .formatToParts(when)
      .map((p) => [p.type, p.value]),
  );
  return `${parts.year}-${parts.month}-${parts.day}`;
}
