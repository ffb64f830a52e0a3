/**
 * The engine input for the live preview, built on the device with the same assembler the server
 * uses at submit (assembleInput in src/lib/rules/assemble-input.ts, free of zod so the
 * walk-through's script stays small), and what is still missing in words for the auditor.
 */
import { assembleInput, type StoredDocuments } from '@/lib/rules/assemble-input';
import type { AssessmentInput } from '@/lib/rules/input';
import type { WalkDraft, WalkGate } from '@/lib/api/walk-through';

export interface PreviewInput {
  input: AssessmentInput;
  /** What must be known before anything can be scored, in words for the auditor. */
  blockers: string[];
}

/** Each field the engine cannot do without, as the auditor is asked for it. */
const BLOCKER_WORDS: Readonly<Record<string, string>> = {
  'observations.site.pedestriansUseDriveway':
    'Say whether people walk through the gateway (gate and site, at the top).',
  'observations.site.childrenOrPetsPresent':
    'Say whether children or pets are about (gate and site, at the top).',
  'observations.site.publicAccess': 'Say whether the public can reach the gate (gate and site, at the top).',
  'observations.site.slopeAcrossSwing':
    'Say whether the ground slopes across the swing (gate and site, at the top).',
  'gate.operator.listed': 'Say whether the operator is listed to the safety standard (edit the gate).',
  'gate.operator.automaticClosing': 'Say whether automatic closing is on (edit the gate).',
  'gate.openingDirection': 'Say which way the swing gate opens (edit the gate).',
  'site.usageClass': 'Say how the site is used (its usage class, on the site).',
};

export function buildPreviewInput(gate: WalkGate, draft: WalkDraft): PreviewInput {
  const { input, missing } = assembleInput(gate, draft as unknown as StoredDocuments);
  return { input, blockers: missing.map((m) => BLOCKER_WORDS[m.field] ?? `${m.field}: ${m.message}`) };
}
