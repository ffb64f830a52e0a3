/**
 * One measured value judged against one limit — the building block of every calculator
 * check, so reports can always show measured value, limit and margin side by side.
 */
import { roundTo } from './numbers';

/** How the limit applies: `at_most`/`at_least` include the limit, `below`/`above` exclude it. */
export type LimitRule = 'at_most' | 'at_least' | 'below' | 'above';

/** A check result. `pass` is null when the value was not measured (the finding needs information). */
export interface LimitCheck {
  pass: boolean | null;
  rule: LimitRule;
  measured: number | null;
  limit: number;
  /** Distance to the limit: positive inside it, negative outside; null when not measured. */
  margin: number | null;
}

function check(
  rule: LimitRule,
  measured: number | null | undefined,
  limit: number,
  decimals: number,
): LimitCheck {
  const roundedLimit = roundTo(limit, decimals);
  if (measured === null || measured === undefined) {
    return { pass: null, rule, measured: null, limit: roundedLimit, margin: null };
  }
  const value = roundTo(measured, decimals);
  const upper = rule === 'at_most' || rule === 'below';
  const margin = roundTo(upper ? roundedLimit - value : value - roundedLimit, decimals);
  const inclusive = rule === 'at_most' || rule === 'at_least';
  const pass = inclusive ? margin >= 0 : margin > 0;
  return { pass, rule, measured: value, limit: roundedLimit, margin };
}

/** Passes when measured ≤ limit (the limit itself passes). Judged on values rounded to `decimals`. */
export const checkAtMost = (measured: number | null | undefined, limit: number, decimals = 1): LimitCheck =>
  check('at_most', measured, limit, decimals);

/** Passes when measured ≥ limit (the limit itself passes). */
export const checkAtLeast = (measured: number | null | undefined, limit: number, decimals = 1): LimitCheck =>
  check('at_least', measured, limit, decimals);

/** Passes when measured < limit (the limit itself fails). */
export const checkBelow = (measured: number | null | undefined, limit: number, decimals = 1): LimitCheck =>
  check('below', measured, limit, decimals);

/** Passes when measured > limit (the limit itself fails). */
export const checkAbove = (measured: number | null | undefined, limit: number, decimals = 1): LimitCheck =>
  check('above', measured, limit, decimals);

/** Combines outcomes: any fail fails; otherwise any unknown is unknown; otherwise pass. */
export function combinePasses(...passes: Array<boolean | null>): boolean | null {
  if (passes.includes(false)) return false;
  if (passes.includes(null)) return null;
  return true;
}
