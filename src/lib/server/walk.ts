/**
 * Everything the walk-through page needs for one assessment, read once on the server: the
 * draft (its answers, measurements and observations), the gate as it stands (with its site's usage class), the pinned
 * ruleset version's sections, areas and questions (not its rules: the island never needs
 * them), the photos and force traces, and whether this viewer may edit.
 */
import type { WalkDraft, WalkGate, WalkRuleset } from '@/lib/api/walk-through';
import type { Assessment } from '@/lib/api/assessments';
import type { ScoreResult } from '@/lib/rules/result-types';
import type { PhotoRecord, TraceRecord } from '@/lib/api/uploads';
import { getAssessment } from './assessments';
import { listTraces } from './force-traces';
import { getGate } from './gates';
import { listPhotos } from './photos';
import { contentById } from './rulesets';
import type { SessionUser } from './session-user';

export interface WalkPageData {
  assessment: Assessment;
  draft: WalkDraft;
  gate: WalkGate;
  ruleset: WalkRuleset;
  photos: PhotoRecord[];
  traces: TraceRecord[];
  result: ScoreResult | null;
  /** Staff may change a draft; an auditor only their own. */
  editable: boolean;
}

export async function loadWalk(viewer: SessionUser, assessmentId: string): Promise<WalkPageData | null> {
  const assessment = await getAssessment(viewer, assessmentId);
  if (!assessment) return null;
  const [gate, content, photos, traces] = await Promise.all([
    getGate(viewer, assessment.gate.id),
    contentById(assessment.ruleset.versionId),
    listPhotos(viewer, assessmentId),
    listTraces(viewer, assessmentId),
  ]);
  if (!gate || !content) return null;
  const ruleset: WalkRuleset = {
    family: assessment.ruleset.family,
    version: content.version,
    title: content.familyTitle,
    sections: content.sections,
    areas: content.areas,
    questions: content.questions.map(
      ({
        key,
        section,
        area,
        prompt,
        whyItMatters,
        answerType,
        options,
        askWhen,
        gateKinds,
        entryUnits,
      }) => ({
        key,
        section,
        area,
        prompt,
        whyItMatters,
        answerType,
        gateKinds,
        ...(options ? { options } : {}),
        ...(askWhen !== undefined ? { askWhen } : {}),
        ...(entryUnits ? { entryUnits } : {}),
      }),
    ),
  };
  const editable =
    assessment.status === 'draft' &&
    viewer.role !== 'homeowner' &&
    (viewer.role !== 'auditor' || assessment.auditor.id === viewer.id);
  return {
    assessment,
    draft: {
      answers: assessment.answers,
      measurements: assessment.measurements as WalkDraft['measurements'],
      observations: assessment.observations as WalkDraft['observations'],
    },
    gate: {
      id: gate.id,
      label: gate.label,
      kind: gate.kind,
      leaves: gate.leaves,
      openingDirection: gate.openingDirection,
      widthMm: gate.widthMm,
      heightMm: gate.heightMm,
      weightKg: gate.weightKg,
      entered: gate.entered,
      operator: gate.operator,
      usageClass: assessment.site.usageClass,
    },
    ruleset,
    photos,
    traces,
    result: (assessment.result as ScoreResult | null) ?? null,
    editable,
  };
}
