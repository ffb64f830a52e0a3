/**
 * The walk-through's contract: what the walk page hands its island (the gate, the pinned
 * ruleset's questions) and the draft's three parts as the assessment PATCH carries them
 * (answers, measurements, observations). Types only; the server builds them, the island reads
 * and edits them (src/lib/walk).
 */
import type { Gate } from '@/lib/api/gates';
import type { RulesetQuestion } from '@/lib/rules/ruleset-schema';
import type { HazardArea, WalkSection } from '@/lib/rules/vocabulary';
import type { JsonValue } from '@/lib/merge-patch';

export interface AnswerValue {
  value: string;
  note?: string;
}

export interface MeasurementValue {
  value: number;
  unit: string;
  canonical: number;
  note?: string;
}

export interface WalkDraft {
  answers: Record<string, AnswerValue>;
  measurements: Record<string, MeasurementValue>;
  observations: Record<string, JsonValue>;
}

export type WalkQuestion = Pick<
  RulesetQuestion,
  | 'key'
  | 'section'
  | 'area'
  | 'prompt'
  | 'whyItMatters'
  | 'answerType'
  | 'options'
  | 'askWhen'
  | 'gateKinds'
  | 'entryUnits'
>;

export interface WalkRuleset {
  family: string;
  version: string;
  title: string;
  sections: { key: WalkSection; title: string }[];
  areas: { key: HazardArea; title: string; description: string }[];
  questions: WalkQuestion[];
}

export type WalkGate = Pick<
  Gate,
  | 'id'
  | 'label'
  | 'kind'
  | 'leaves'
  | 'openingDirection'
  | 'widthMm'
  | 'heightMm'
  | 'weightKg'
  | 'entered'
  | 'operator'
> & {
  usageClass: number;
};

export interface WalkPlace {
  clientName: string;
  siteLabel: string;
}
