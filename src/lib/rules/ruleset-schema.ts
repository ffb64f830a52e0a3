/**
 * The shape of a ruleset version file (`rulesets/<family>/<version>.json`). A version is one JSON
 * document: stored as jsonb, hashed in canonical form, diffed field by field, and amended by
 * changing a rule's params / severity / enabled flag or adding rules marked `local`.
 *
 * Conditions are JSON Logic and are TRUE WHEN THE GATE PASSES. They read facts (see
 * fact-catalogue.ts) and the rule's own params as `{"var": "params.<name>"}`; numbers live in
 * params, never in the condition. Nothing here has defaults: what the file says is the content,
 * so the hash of the file and of the parsed document are the same.
 */
import { z } from 'zod';
import {
  GATE_KINDS,
  HAZARD_AREAS,
  KEY_PATTERN,
  SEVERITIES,
  TRAVEL_DIRECTIONS,
  USAGE_CLASSES,
  WALK_SECTIONS,
} from './vocabulary';
import { MEASURED_ANSWER_TYPES } from './measures';
import { checkRulesetReferences } from './ruleset-references';
import { ENTRAPMENT_ZONES } from './input';

/** Marks the file format, so a later format can be told apart and migrated. */
export const RULESET_FORMAT = 'latchwell.ruleset/1';

const text = (max: number) =>
  z.string().trim().min(1, 'must not be empty').max(max, `must be at most ${max} characters`);
const key = z
  .string()
  .regex(KEY_PATTERN, 'must be camelCase letters and digits, starting with a lower-case letter');
const isoDate = z.iso.date({ message: 'must be a date written YYYY-MM-DD' });

/** A JSON Logic expression; operators and fact references are checked by the cross-reference pass. */
export const JsonLogicSchema = z.json();

export const FamilySlugSchema = z
  .string()
  .regex(/^[a-z][a-z0-9]*(?:-[a-z0-9]+)*$/, 'must be a lower-case slug such as "north-american-gate"')
  .max(64);

/** `2026.1`, or an amendment such as `2026.1-local.2`. */
export const VersionLabelSchema = z
  .string()
  .regex(/^\d{4}\.\d+(?:-[a-z0-9]+(?:\.\d+)?)?$/, 'must look like "2026.1" or "2026.1-local.2"');

export const SourceSchema = z.strictObject({
  id: key,
  title: text(300),
  edition: text(120).optional(),
  kind: z.enum(['standard', 'guidance', 'code', 'common_practice', 'local']),
  note: text(500).optional(),
});

export const SectionSchema = z.strictObject({ key: z.enum(WALK_SECTIONS), title: text(120) });

export const AreaSchema = z.strictObject({
  key: z.enum(HAZARD_AREAS),
  title: text(120),
  description: text(500),
});

export const ANSWER_TYPES = ['yes_no_na', ...MEASURED_ANSWER_TYPES, 'choice', 'date', 'text'] as const;
export type AnswerType = (typeof ANSWER_TYPES)[number];

export const ChoiceOptionSchema = z.strictObject({
  value: z.string().regex(/^[a-z][a-z0-9_]*$/),
  label: text(120),
});

/**
 * One thing the walk-through asks. `answerType` names the unit kind for measured answers
 * (length → mm, force → N, mass → kg, speed → m/s, time → s, voltage → V, current → A,
 * angle → deg, count). Measured answers are read as `m.<key>`, the others as `answers.<key>`.
 */
export const QuestionSchema = z
  .strictObject({
    key,
    section: z.enum(WALK_SECTIONS),
    area: z.enum(HAZARD_AREAS),
    prompt: text(300),
    whyItMatters: text(400),
    answerType: z.enum(ANSWER_TYPES),
    options: z.array(ChoiceOptionSchema).min(2).optional(),
    gateKinds: z.array(z.enum(GATE_KINDS)).min(1),
    askWhen: JsonLogicSchema.optional(),
    /**
     * Units the walk-through offers for a measured answer, when the kind's usual pair does not
     * fit (a wire run in feet or metres rather than inches or millimetres). Each must be a unit
     * of the question's kind (checked with the cross-references).
     */
    entryUnits: z.array(z.string().min(1).max(8)).min(1).max(4).optional(),
  })
  .superRefine((q, ctx) => {
    if (q.answerType === 'choice' && !q.options)
      ctx.addIssue({ code: 'custom', path: ['options'], message: 'a choice question needs its options' });
    if (q.answerType !== 'choice' && q.options)
      ctx.addIssue({ code: 'custom', path: ['options'], message: 'only choice questions have options' });
  });

export const PARAM_UNITS = ['mm', 'N', 'kg', 'm/s', 's', 'V', 'A', '%', 'deg', 'Hz', 'count'] as const;

/** A threshold. Numbers carry their unit; lists and words (allowed choices) need none. */
export const ParamSchema = z.union([
  z.strictObject({ value: z.number(), unit: z.enum(PARAM_UNITS), note: text(300).optional() }),
  z.strictObject({
    value: z.union([z.string(), z.boolean(), z.array(z.union([z.string(), z.number()]))]),
    note: text(300).optional(),
  }),
]);

export const ReferenceSchema = z.strictObject({
  standard: text(200),
  clause: text(200),
  source: key.optional(),
  note: text(300).optional(),
});

export const RuleSchema = z.strictObject({
  id: z.string().regex(/^[a-z]+(?:\.[a-z0-9]+(?:-[a-z0-9]+)*)+$/, 'must look like "pinch.hinge-side"'),
  title: text(160),
  area: z.enum(HAZARD_AREAS),
  severity: z.enum(SEVERITIES),
  appliesTo: z.strictObject({
    gateKinds: z.array(z.enum(GATE_KINDS)).min(1),
    usageClasses: z
      .array(
        z.union(
          USAGE_CLASSES.map((c) => z.literal(c)) as [
            z.ZodLiteral<1>,
            z.ZodLiteral<2>,
            z.ZodLiteral<3>,
            z.ZodLiteral<4>,
          ],
        ),
      )
      .min(1),
  }),
  appliesWhen: JsonLogicSchema.optional(),
  /** True when the gate passes. */
  condition: JsonLogicSchema,
  /** Facts whose absence makes the finding needs_info. */
  requires: z.array(z.string()),
  /** Facts the condition may read that can be absent (the condition must cope with null). */
  optional: z.array(z.string()).optional(),
  params: z.record(key, ParamSchema),
  /** HRN degree-of-possible-harm key from the version's table (`hrn.dph`): the worst credible injury. */
  harm: z.string().regex(/^[a-z0-9_]+$/),
  remediation: text(600),
  caution: text(600),
  reference: ReferenceSchema,
  enabled: z.boolean(),
  local: z.literal(true).optional(),
});

const HrnLevelSchema = z.strictObject({
  key: z.string().regex(/^[a-z0-9_]+$/),
  label: text(80),
  value: z.number().nonnegative(),
});

/**
 * HRN = LO × FE × DPH × NP, as data with its source, since published tables differ. Levels are
 * listed least to most severe; `np` and `bands` rows hold up to `upTo` inclusive (null: no end).
 */
export const HrnTableSchema = z.strictObject({
  source: text(400),
  lo: z.array(HrnLevelSchema).min(2),
  fe: z.array(HrnLevelSchema).min(2),
  dph: z.array(HrnLevelSchema).min(2),
  np: z
    .array(
      z.strictObject({
        key: z.string().regex(/^[a-z0-9_]+$/),
        label: text(80),
        upTo: z.number().int().positive().nullable(),
        value: z.number().positive(),
      }),
    )
    .min(1),
  bands: z
    .array(
      z.strictObject({
        key: z.string().regex(/^[a-z_]+$/),
        label: text(80),
        upTo: z.number().positive().nullable(),
      }),
    )
    .min(2),
  /**
   * Which band a value exactly on an edge falls in: `upper_inclusive` (a band holds its `upTo`:
   * 50 is "significant") or `lower_inclusive` (a band starts at the previous `upTo`: 50 is
   * "high"). Versions without it read `upper_inclusive`, as the engine always did.
   */
  bandEdges: z.enum(['upper_inclusive', 'lower_inclusive']).optional(),
  /**
   * Steps up (or down) the likelihood scale by the failing rule's severity, so the default rating
   * of a critical finding is never below a major one with the same harm at the same gate.
   */
  likelihoodStepBySeverity: z
    .strictObject({
      critical: z.number().int().min(-3).max(3),
      major: z.number().int().min(-3).max(3),
      minor: z.number().int().min(-3).max(3),
    })
    .optional(),
});

export const ScoringSchema = z.strictObject({
  /** Weight of a rule in its area score by severity. */
  severityWeights: z.strictObject({
    critical: z.number().positive(),
    major: z.number().positive(),
    minor: z.number().positive(),
  }),
  /** Highest score an area may show while it holds a failing critical rule (0–100). */
  criticalFailureAreaCap: z.number().min(0).max(100).optional(),
});

/**
 * An entrapment zone a measurement implies: when `when` holds (it reads answers, measurements,
 * the profile and the site, and the params of `rule`, whose threshold it shares), the zone is
 * added to the ones the auditor listed, in that direction, before the entrapment facts are
 * worked out. So a measured clearance under the limit asks for protection by itself.
 */
export const ImpliedZoneSchema = z.strictObject({
  zone: z.enum(ENTRAPMENT_ZONES),
  direction: z.enum(TRAVEL_DIRECTIONS),
  gateKinds: z.array(z.enum(GATE_KINDS)).min(1),
  rule: z.string().min(3).max(120),
  when: JsonLogicSchema,
  note: text(300),
});

/**
 * Answers that contradict the rest of the record ("the photo-eye reverses the gate" with no
 * photo-eye listed). When `when` holds, each fact in `facts` is not accepted: rules reading it
 * need information, and the result lists the contradiction to resolve.
 */
export const CrossCheckSchema = z.strictObject({
  id: z.string().regex(/^[a-z]+(?:[.-][a-z0-9]+)+$/, 'must look like "sensing.photo-eye-listed"'),
  facts: z.array(z.string().min(3).max(120)).min(1),
  when: JsonLogicSchema,
  message: text(300),
});

/**
 * When the gate is visited again, by verdict: a cleared gate after the days its usage class
 * gives, one to remedy after `remedyAfterDays`, a withdrawn one as soon as the fixes are
 * reported (never on a calendar date while it stands out of automatic use).
 */
export const ReinspectionSchema = z.strictObject({
  clearAfterDays: z.strictObject({
    '1': z.number().int().positive(),
    '2': z.number().int().positive(),
    '3': z.number().int().positive(),
    '4': z.number().int().positive(),
  }),
  remedyAfterDays: z.strictObject({
    '1': z.number().int().positive(),
    '2': z.number().int().positive(),
    '3': z.number().int().positive(),
    '4': z.number().int().positive(),
  }),
  withdraw: z.literal('when_fixes_reported'),
  note: text(300),
});

const RulesetShapeSchema = z.strictObject({
  format: z.literal(RULESET_FORMAT),
  family: FamilySlugSchema,
  familyTitle: text(160),
  version: VersionLabelSchema,
  derivedFrom: z
    .strictObject({
      family: FamilySlugSchema,
      version: VersionLabelSchema,
      contentSha256: z.string().regex(/^[0-9a-f]{64}$/),
    })
    .optional(),
  jurisdiction: text(120),
  region: text(120),
  effectiveFrom: isoDate,
  summary: text(1000),
  sources: z.array(SourceSchema).min(1),
  sections: z.array(SectionSchema).min(1),
  areas: z.array(AreaSchema).min(1),
  scoring: ScoringSchema,
  hrn: HrnTableSchema,
  questions: z.array(QuestionSchema),
  rules: z.array(RuleSchema).min(1),
  impliedZones: z.array(ImpliedZoneSchema).optional(),
  crossChecks: z.array(CrossCheckSchema).optional(),
  reinspection: ReinspectionSchema.optional(),
});

/** A ruleset version, with every cross-reference checked (see ruleset-references.ts). */
export const RulesetVersionSchema = RulesetShapeSchema.superRefine((ruleset, ctx) => {
  for (const issue of checkRulesetReferences(ruleset))
    ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message });
});

export type RulesetVersion = z.infer<typeof RulesetShapeSchema>;
export type RulesetRule = z.infer<typeof RuleSchema>;
export type RulesetQuestion = z.infer<typeof QuestionSchema>;
export type RulesetParam = z.infer<typeof ParamSchema>;
export type HrnTable = z.infer<typeof HrnTableSchema>;
export type RulesetReference = z.infer<typeof ReferenceSchema>;
export type ImpliedZone = z.infer<typeof ImpliedZoneSchema>;
export type CrossCheck = z.infer<typeof CrossCheckSchema>;
export type Reinspection = z.infer<typeof ReinspectionSchema>;
