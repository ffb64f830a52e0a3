/**
 * The engine input of an archived, signed assessment, built without re-validating it.
 *
 * `buildEngineInput` (assessment-input.ts) builds the same object and then parses it with the
 * engine's schema, which costs more than scoring it. A signed assessment's stored documents and
 * gate snapshot were parsed exactly so when it was submitted, and signed rows never change
 * (database trigger), so re-scoring thousands of them for an impact list can skip that parse.
 * The only thing that depends on the version scored against — which answers are yes/no and
 * which are choices — is redone here. tests/unit/archive/archived-input.test.ts checks that
 * this gives what buildEngineInput gives, so the two cannot drift apart unnoticed.
 */
import type { AssessmentInput, MeasuredValue, RulesetQuestion } from '@/lib/rules';
import { canonicalValue, kindOfUnit } from '@/lib/rules/measures';
import type { AssessmentDocuments, GateForScoring } from './assessment-input';

function dimension(
  stored: number | null,
  entered: { value: number; unit: string } | undefined,
  canonicalUnit: 'mm' | 'kg',
): MeasuredValue | undefined {
  if (stored === null || stored === undefined) return undefined;
  const { value, unit } = entered ?? { value: stored, unit: canonicalUnit };
  const kind = kindOfUnit(unit) ?? (canonicalUnit === 'mm' ? 'length' : 'mass');
  return { value, unit, canonical: canonicalValue(kind, value, unit) };
}

const yesNoKeys = new WeakMap<readonly RulesetQuestion[], Set<string>>();

/**
 * Keys left undefined here are absent after a schema parse; nothing reads the difference (the
 * engine tests for undefined, and the input hash drops undefined members as JSON does).
 */
export function archivedEngineInput(
  gate: GateForScoring,
  documents: AssessmentDocuments,
  questions: readonly RulesetQuestion[],
): AssessmentInput {
  let yesNo = yesNoKeys.get(questions);
  if (!yesNo)
    yesNoKeys.set(
      questions,
      (yesNo = new Set(questions.filter((q) => q.answerType === 'yes_no_na').map((q) => q.key))),
    );
  const answers: Record<string, { value: string; note?: string }> = {};
  const choices: Record<string, { value: string; note?: string }> = {};
  for (const [key, entry] of Object.entries(documents.answers))
    (yesNo.has(key) ? answers : choices)[key] = entry;
  const { site, entrapment, forceTests, swingGeometry, hrnOverrides } = documents.observations;
  return {
    profile: {
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
    },
    site: site ?? {},
    answers,
    choices,
    measurements: documents.measurements,
    entrapment,
    forceTests,
    swingGeometry,
    hrnOverrides,
  } as AssessmentInput;
}
