/**
 * The rules engine's public surface: pure TypeScript (no I/O, no framework), the same code in an
 * endpoint, a benchmark and a test. Load a version with `loadRulesetFile`, score an input with
 * `score`, hash the result with `resultSha256`, compare versions with `diffRulesets`.
 */
export { score, scoreParsed, type LoadedRuleset } from './engine';
export {
  loadRulesetFile,
  validateRuleset,
  RulesetValidationError,
  type RulesetProblem,
} from './load-ruleset';
export {
  diffRulesets,
  fieldChanges,
  type RulesetDiff,
  type ItemsDiff,
  type ItemChange,
  type FieldChange,
} from './diff';
export { canonicalJson, contentSha256, resultSha256, sha256Hex } from './hash';
export { compileRuleset, type CompiledRuleset, type CompiledRule } from './compile';
export { compileLogic, truthy, COMPILED_OPERATORS, type CompiledLogic } from './json-logic-compile';
export { buildFacts, type Facts, type FactsResult, type EvidenceProblem } from './facts';
export { FACT_CATALOGUE, POWER_INPUT_KEYS, SIGNAGE_INPUT_KEYS, type FactSpec } from './fact-catalogue';
export { AssessmentInputError, checkInputAgainstRuleset, isIsoDate, type InputIssue } from './input-check';
export { inputRecordJson, inputSha256 } from './input-hash';
export { resultJson } from './result-json';
export {
  assembleInput,
  SITE_FACT_KEYS,
  type AssembledInput,
  type GateForScoring,
  type MissingField,
  type StoredDocuments,
} from './assemble-input';
export {
  AssessmentInputSchema,
  GateProfileSchema,
  SiteContextSchema,
  MeasuredValueSchema,
  AnswerSchema,
  EntrapmentInputSchema,
  ForceTestSchema,
  SwingGeometryInputSchema,
  HrnOverrideSchema,
  ENTRAPMENT_ZONES,
  type AssessmentInput,
  type Answer,
  type GateProfile,
  type SiteContext,
  type MeasuredValue,
  type EntrapmentInput,
  type ForceTest,
  type SwingGeometryInput,
} from './input';
export {
  RulesetVersionSchema,
  RULESET_FORMAT,
  ANSWER_TYPES,
  type RulesetVersion,
  type RulesetRule,
  type RulesetQuestion,
  type RulesetParam,
  type RulesetReference,
  type HrnTable,
  type AnswerType,
} from './ruleset-schema';
export { factKeyOfQuestion, type RulesetIssue } from './ruleset-references';
export { questionsToAsk } from './questions-to-ask';
export type {
  ScoreResult,
  Finding,
  FindingHrn,
  MissingItem,
  NeedsInfoItem,
  OutcomeCounts,
  Contradiction,
  Reinspection,
} from './result-types';
export * from './vocabulary';
export { CANONICAL_UNIT_OF, MEASURED_ANSWER_TYPES, type MeasuredAnswerType } from './measures';
