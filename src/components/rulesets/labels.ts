/** Words the ruleset pages and the amendment editor show for the engine's codes. */
import type { RulesetStatus } from '@/lib/api/rulesets';
import type { GateKind, Severity } from '@/lib/rules/vocabulary';

export const SEVERITY_LABEL: Record<Severity, string> = { critical: 'Critical', major: 'Major', minor: 'Minor' };

/** Severity chips: critical in the withdraw red, major in the remedy amber, minor quiet. */
export const SEVERITY_CLASS: Record<Severity, string> = {
  critical: 'bg-withdraw text-white',
  major: 'bg-remedy text-white',
  minor: 'bg-iron-100 text-iron-800',
};

export const STATUS_LABEL: Record<RulesetStatus, string> = { draft: 'Draft', published: 'Published', retired: 'Retired' };

export const STATUS_CLASS: Record<RulesetStatus, string> = {
  draft: 'bg-brass-100 text-brass-700',
  published: 'bg-clear text-white',
  retired: 'bg-iron-100 text-iron-600',
};

export const GATE_KIND_LABEL: Record<GateKind, string> = {
  swing: 'Swing',
  slide: 'Slide',
  barrier_arm: 'Barrier arm',
  vertical_lift: 'Vertical lift',
  vertical_pivot: 'Vertical pivot',
  overhead_pivot: 'Overhead pivot',
};

export const ANSWER_TYPE_LABEL: Record<string, string> = {
  yes_no_na: 'Yes / no / not applicable',
  length: 'Length (mm)',
  force: 'Force (N)',
  mass: 'Mass (kg)',
  speed: 'Speed (m/s)',
  time: 'Time (s)',
  voltage: 'Voltage (V)',
  current: 'Current (A)',
  angle: 'Angle (°)',
  count: 'Count',
  choice: 'Choice',
  date: 'Date',
  text: 'Text',
};

/** "Swing and slide gates", "All gate kinds". */
export function gateKindsText(kinds: readonly GateKind[]): string {
  if (kinds.length === Object.keys(GATE_KIND_LABEL).length) return 'All gate kinds';
  const names = kinds.map((k) => GATE_KIND_LABEL[k].toLowerCase());
  const list = names.length > 1 ? `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}` : names[0];
  return `${list.charAt(0).toUpperCase()}${list.slice(1)} gates`;
}

/** "Usage classes I–IV", "Usage classes II and III". */
export function usageClassesText(classes: readonly number[]): string {
  const roman = ['', 'I', 'II', 'III', 'IV'];
  const sorted = [...classes].sort();
  if (sorted.length === 4) return 'Usage classes I–IV';
  if (sorted.length === 1) return `Usage class ${roman[sorted[0]]}`;
  return `Usage classes ${sorted.slice(0, -1).map((c) => roman[c]).join(', ')} and ${roman[sorted[sorted.length - 1]]}`;
}
