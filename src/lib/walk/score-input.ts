/**
 * The engine input for the live preview, built on the device from the gate and the draft's
 * draft the way the server builds it at submit (src/lib/server/assessment-input.ts):
 * answers split into yes/no/na answers and choices by question type, the profile from the
 * gate. Kept free of zod so the walk-through's script stays small; the server checks the input.
 */
import type { WalkDraft, WalkGate, WalkQuestion } from '@/lib/api/walk-through';
import { canonicalValue, kindOfUnit } from '@/lib/rules/measures';

export interface PreviewInput {
  input: Record<string, unknown>;
  /** What must be known before anything can be scored, in words for the auditor. */
  blockers: string[];
}

const SITE_FACTS = [
  ['pedestriansUseDriveway', 'whether people walk through the gateway'],
  ['childrenOrPetsPresent', 'whether children or pets are about'],
  ['publicAccess', 'whether the public can reach the gate'],
  ['slopeAcrossSwing', 'whether the ground slopes across the swing'],
] as const;

function dimension(
  stored: number | null,
  entered: { value: number; unit: string } | undefined,
  unit: 'mm' | 'kg',
) {
  if (stored === null) return undefined;
  const { value, unit: enteredUnit } = entered ?? { value: stored, unit };
  const kind = kindOfUnit(enteredUnit) ?? (unit === 'mm' ? 'length' : 'mass');
  return { value, unit: enteredUnit, canonical: canonicalValue(kind, value, enteredUnit) };
}

export function buildPreviewInput(
  gate: WalkGate,
  documents: WalkDraft,
  questions: readonly WalkQuestion[],
): PreviewInput {
  const typeOf = new Map(questions.map((q) => [q.key, q.answerType]));
  const answers: Record<string, { value: string; note?: string }> = {};
  const choices: Record<string, { value: string; note?: string }> = {};
  for (const [key, entry] of Object.entries(documents.answers)) {
    if (!typeOf.has(key)) continue;
    const clean = entry.note ? { value: entry.value, note: entry.note } : { value: entry.value };
    if (typeOf.get(key) === 'yes_no_na') answers[key] = clean;
    else choices[key] = clean;
  }
  const measurements: Record<string, { value: number; unit: string; canonical: number; note?: string }> = {};
  for (const [key, entry] of Object.entries(documents.measurements)) {
    if (!typeOf.has(key)) continue;
    measurements[key] = entry.note
      ? entry
      : { value: entry.value, unit: entry.unit, canonical: entry.canonical };
  }
  const site = (documents.observations.site ?? {}) as Record<string, unknown>;
  const blockers: string[] = [];
  for (const [key, words] of SITE_FACTS)
    if (typeof site[key] !== 'boolean') blockers.push(`Say ${words} (gate and site, at the top).`);
  if (typeof gate.operator.listed !== 'boolean')
    blockers.push('Say whether the operator is listed to the safety standard (edit the gate).');
  if (typeof gate.operator.automaticClosing !== 'boolean')
    blockers.push('Say whether automatic closing is on (edit the gate).');
  if (gate.kind === 'swing' && !gate.openingDirection)
    blockers.push('Say which way the swing gate opens (edit the gate).');

  const { entrapment, forceTests, swingGeometry, hrnOverrides } = documents.observations;
  const input: Record<string, unknown> = {
    profile: stripUndefined({
      kind: gate.kind,
      leaves: gate.leaves,
      openingDirection: gate.openingDirection ?? undefined,
      usageClass: gate.usageClass,
      leafWidth: dimension(gate.widthMm, gate.entered.width, 'mm'),
      leafHeight: dimension(gate.heightMm, gate.entered.height, 'mm'),
      leafWeight: dimension(gate.weightKg, gate.entered.weight, 'kg'),
      operatorListed: gate.operator.listed ?? undefined,
      automaticClosing: gate.operator.automaticClosing ?? undefined,
      operatorManufacturedOn: gate.operator.manufacturedOn ?? undefined,
    }),
    site,
    answers,
    choices,
    measurements,
    ...stripUndefined({ entrapment, forceTests, swingGeometry, hrnOverrides }),
  };
  return { input, blockers };
}

function stripUndefined<T extends Record<string, unknown>>(value: T): Partial<T> {
  return Object.fromEntries(
    Object.entries(value).filter(([, v]) => v !== undefined && v !== null),
  ) as Partial<T>;
}
