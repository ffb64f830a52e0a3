/**
 * The verdict, the one word a homeowner remembers:
 * - `withdraw`: any critical rule fails. Take the gate out of automatic operation until fixed.
 * - `remedy`: any major rule fails, or a critical rule could not be checked (needs_info): fix or
 *   document by a date.
 * - `clear`: nothing above minor fails. A major rule that needs information does not by itself
 *   block `clear`, but the result's `complete` flag is false and the item is listed.
 */
import type { Finding } from './result-types';
import type { Verdict } from './vocabulary';

export function verdictOf(findings: readonly Finding[]): Verdict {
  let remedy = false;
  for (const f of findings) {
    if (f.severity === 'critical' && f.outcome === 'fail') return 'withdraw';
    if (f.severity === 'major' && f.outcome === 'fail') remedy = true;
    if (f.severity === 'critical' && f.outcome === 'needs_info') remedy = true;
  }
  return remedy ? 'remedy' : 'clear';
}
