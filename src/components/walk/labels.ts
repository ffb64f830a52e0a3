/** Words the walk-through shows for the engine's codes (ours, in the trade's words). */
import type { Verdict } from '@/lib/rules/vocabulary';
import { VERDICT_WORDS } from '@/lib/vocabulary';

export { SEVERITY_LABEL, VERDICT_CLASS } from '@/lib/vocabulary';

const each = (pick: (w: (typeof VERDICT_WORDS)[Verdict]) => string) =>
  Object.fromEntries(Object.entries(VERDICT_WORDS).map(([k, w]) => [k, pick(w)])) as Record<Verdict, string>;

export const VERDICT_LABEL = each((w) => w.label);

/** Short forms for the status bar. */
export const VERDICT_SHORT = each((w) => w.short);

export const VERDICT_EXPLANATION = each((w) => w.explanation);

/** The verdict as coloured text on white (a status, not a filled button). */
export const VERDICT_TEXT_CLASS: Record<Verdict, string> = {
  clear: 'text-clear',
  remedy: 'text-remedy',
  withdraw: 'text-withdraw',
};

export const VERDICT_ICON: Record<Verdict, string> = { clear: '✓', remedy: '!', withdraw: '■' };

export const YES_NO_NA_LABEL = { yes: 'Yes', no: 'No', na: 'N/A' } as const;

export const ZONE_LABEL: Record<string, string> = {
  closing_edge: 'Closing edge',
  hinge_side: 'Hinge side',
  open_side: 'Open side (against a wall or fence)',
  post_gap: 'Gap at the post',
  gate_bottom: 'Under the gate',
  other: 'Elsewhere',
};

/** UL 325 entrapment protection types, described in our own words. */
export const DEVICE_LABEL: Record<string, string> = {
  A: 'A · built into the operator (senses and reverses)',
  B1: 'B1 · non-contact sensor (photo eye)',
  B2: 'B2 · contact sensor (edge)',
  C: 'C · force-limiting clutch or relief',
  D: 'D · hold-to-run control',
  E: 'E · audible alarm',
};

export const DIRECTION_LABEL = { closing: 'While closing', opening: 'While opening' } as const;

export const TRACE_LOCATION_LABEL: Record<string, string> = {
  closing_edge: 'Closing edge',
  opening_edge: 'Opening edge',
  hinge_side: 'Hinge side',
  post_gap: 'Gap at the post',
  other: 'Other point',
};
