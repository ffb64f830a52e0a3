/**
 * RFC 7240 `Prefer: return=minimal | representation` on a change: what the answer carries is
 * the route's to say (the preference is a wish, never a requirement), and an answer that
 * honoured it says so in `Preference-Applied`. Caches must keep the two apart: `Vary: Prefer`.
 */
import parsePreferHeader from 'parse-prefer-header';

export type ReturnPreference = 'minimal' | 'representation';

/** The `return` preference of the request; `representation` (the full answer) when absent or unknown. */
export function returnPreference(request: Request): ReturnPreference {
  const value = parsePreferHeader(request.headers.get('prefer'))['return'];
  return value === 'minimal' ? 'minimal' : 'representation';
}

/** Headers for an answer made with the given `return` preference. */
export function preferenceHeaders(applied: ReturnPreference): Record<string, string> {
  return applied === 'minimal'
    ? { 'preference-applied': 'return=minimal', vary: 'Prefer' }
    : { vary: 'Prefer' };
}
