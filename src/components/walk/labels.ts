/** Words the walk-through shows for the engine's codes (ours, in the trade's words). */
import type { Verdict } from '@/lib/rules/vocabulary';

export const VERDICT_LABEL: Record<Verdict, string> = {
  clear: 'Clear',
  remedy: 'Remedy needed',
  withdraw: 'Withdraw from automatic use',
};

/** Short forms for the status bar. */
export const VERDICT_SHORT: Record<Verdict, string> = { clear: 'Clear', remedy: 'Remedy', withdraw: 'Withdraw' };

export const VERDICT_EXPLANATION: Record<Verdict, string> = {
  clear: 'Nothing above a minor item fails.',
  remedy: 'Fix the failing items by an agreed date.',
  withdraw: 'A critical item fails: switch the gate to manual until it is fixed.',
};

/** Text and background classes with at least 4.5:1 contrast, for sunlight. */
export const VERDICT_CLASS: Record<Verdict, string> = {
  clear: 'bg-clear text-white',
  remedy: 'bg-remedy text-white',
  withdraw: 'bg-withdraw text-white',
};

export const SEVERITY_LABEL = { critical: 'Critical', major: 'Major', minor: 'Minor' } as const;

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
