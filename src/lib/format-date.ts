/** Dates for people, in the organisation's time zone (stored as timestamptz, shown locally). */
export function formatDay(iso: string | null, timeZone: string): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'medium' }).format(new Date(iso));
}

export function formatDayTime(iso: string | null, timeZone: string): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'medium', timeStyle: 'short' }).format(new Date(iso));
}
