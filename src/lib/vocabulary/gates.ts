/**
 * Gates, sites, clients and people in words: gate kinds, usage classes ("Class I"–"Class IV"),
 * client kinds, roles, and the walk-through's entrapment zones, devices and answers.
 */
import type { GateKind } from '@/lib/rules/vocabulary';
import { humanise } from './humanise';
import { listOf } from './numbers';

export const GATE_KIND_LABEL: Record<GateKind, string> = {
  swing: 'Swing',
  slide: 'Slide',
  barrier_arm: 'Barrier arm',
  vertical_lift: 'Vertical lift',
  vertical_pivot: 'Vertical pivot',
  overhead_pivot: 'Overhead pivot',
};

export function gateKindLabel(kind: string): string {
  return GATE_KIND_LABEL[kind as GateKind] ?? humanise(kind);
}

/** "Swing and slide gates", "All gate kinds". */
export function gateKindsText(kinds: readonly GateKind[]): string {
  if (kinds.length === Object.keys(GATE_KIND_LABEL).length) return 'All gate kinds';
  const names = listOf(kinds.map((k) => gateKindLabel(k).toLowerCase()));
  return `${names.charAt(0).toUpperCase()}${names.slice(1)} gates`;
}

const ROMAN = ['', 'I', 'II', 'III', 'IV'];

/** A usage class (UL 325 I residential … IV supervised restricted access) as the trade writes it. */
export function usageClassNumeral(usageClass: number): string {
  return ROMAN[usageClass] ?? String(usageClass);
}

/** "Class II"; "Class not set" when the site has none. */
export function usageClassLabel(usageClass: number | null | undefined): string {
  return usageClass ? `Class ${usageClassNumeral(usageClass)}` : 'Class not set';
}

/** "Classes I–IV", "Class II", "Classes II and III". */
export function usageClassesText(classes: readonly number[]): string {
  const sorted = [...classes].sort();
  if (sorted.length === 4) return 'Classes I–IV';
  if (sorted.length === 1) return usageClassLabel(sorted[0]);
  return `Classes ${listOf(sorted.map(usageClassNumeral))}`;
}

export const CLIENT_KIND_LABEL: Record<string, string> = {
  homeowner: 'Homeowner',
  property_manager: 'Property manager',
  business: 'Business',
};

export const ROLE_LABEL: Record<string, string> = {
  owner: 'Owner',
  office: 'Office',
  auditor: 'Auditor',
  homeowner: 'Homeowner or manager',
};

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
