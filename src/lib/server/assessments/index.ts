/**
 * The assessment lifecycle: the one module that changes an assessment's status and holds the
 * SQL on the `assessments` table. Drafts are created, saved over a row version and discarded
 * here; submit scores a draft and the database freezes its scored record; sending, signing
 * and revising move the status through the functions exported here.
 */
export {
  assertEditable,
  createAssessment,
  discardAssessment,
  getAssessment,
  listAssessments,
  listAssessmentsJson,
  patchAssessment,
  revisionLinks,
  type RequestFacts,
} from './drafts';
export { readAssessmentJson } from './read';
export { submitAssessment } from './submit';
export { loadFrozenAssessment, type FrozenAssessment } from './frozen';
export { addressLines, parseScoredRecord, ScoredRecordSchema, type ScoredRecord } from './scored-record';
export {
  lockAssessment,
  markAwaitingSignature,
  markSigned,
  SENDABLE_STATUSES,
  type LockedAssessment,
} from './transitions';
export { reviseAssessment } from './revise';
export { countAssessmentsOfGates } from './counts';
export {
  gateAssessmentIdsAsText,
  joinAssessment,
  joinAssessmentOfClient,
  lastSignedOfEachGateSql,
  organisationAssessments,
  organisationAssessmentsWithPlace,
  organisationsSignedUnderOtherVersions,
} from './reads';
// Ruleset impact's reads: the whole of impact-reads.ts is public.
export * from './impact-reads';
export {
  carriedForwardOf,
  confirmCarriedForward,
  lastSignedVisitDays,
  type CarriedForward,
} from './carry-forward';
