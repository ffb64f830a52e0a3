/**
 * The ruleset resource: families (shipped, or an organisation's own local family), their
 * versions, scoring previews and local amendments. Pure zod schemas and response types, so the
 * amendment editor checks a form with the same rules as the server.
 *
 * Imports from `@/lib/rules` name single files: the engine's index pulls in node:crypto, which an
 * island must not bundle.
 */
import { z } from 'zod';
import { AssessmentInputSchema } from '@/lib/rules/input';
import { MEASURED_ANSWER_TYPES } from '@/lib/rules/measures';
import type { RulesetVersion } from '@/lib/rules/ruleset-schema';
import {
  GATE_KINDS,
  HAZARD_AREAS,
  KEY_PATTERN,
  SEVERITIES,
  USAGE_CLASSES,
  WALK_SECTIONS,
} from '@/lib/rules/vocabulary';

const enumOf = <const T extends readonly [string, ...string[]]>(values: T) =>
  z.enum(values, `must be one of: ${values.join(', ')}`);
const noNul = (value: string) => !value.includes('\u0000');
const text = (max: number) =>
  z
    .string()
    .trim()
    .min(1, 'must not be empty')
    .max(max, `must be at most ${max} characters`)
    .refine(noNul, 'must not contain NUL characters');

export const FamilySlugSchema = z
  .string()
  .max(64, 'must be at most 64 characters')
  .regex(/^[a-z][a-z0-9]*(?:-[a-z0-9]+)*$/, 'must be a ruleset family slug such as "north-american-gate"');

export const VersionLabelSchema = z
  .string()
  .max(40, 'must be at most 40 characters')
  .regex(
    /^\d{4}\.\d+(?:-[a-z0-9]+(?:\.\d+)?)?$/,
    'must be a version label such as "2026.1" or "2026.1-local.2"',
  );

export const RuleIdSchema = z
  .string()
  .max(120, 'must be at most 120 characters')
  .regex(/^[a-z]+(?:\.[a-z0-9]+(?:-[a-z0-9]+)*)+$/, 'must be a rule id such as "pinch.hinge-side"');

/** Local rules live under their own prefix, so a later shipped version can never collide with them. */
export const LOCAL_RULE_PREFIX = 'local.';

const questionKey = z
  .string()
  .regex(KEY_PATTERN, 'must be camelCase letters and digits, starting with a lower-case letter');

// ---------------------------------------------------------------------------------------------
// Scoring preview

/** `POST /api/score`: an input scored against a family's current version, or the named one. */
export const ScoreRequestSchema = z.strictObject({
  family: FamilySlugSchema,
  version: VersionLabelSchema.optional(),
  input: AssessmentInputSchema,
});
export type ScoreRequest = z.infer<typeof ScoreRequestSchema>;

// ---------------------------------------------------------------------------------------------
// Reading

/** `GET /api/rulesets/{family}/diff?from=&to=`; `fromFamily` compares across families (an amendment against its baseline). */
export const RulesetDiffQuerySchema = z.strictObject({
  from: VersionLabelSchema,
  to: VersionLabelSchema,
  fromFamily: FamilySlugSchema.optional(),
});
export type RulesetDiffQuery = z.infer<typeof RulesetDiffQuerySchema>;

export const RULESET_STATUSES = ['draft', 'published', 'retired'] as const;
export type RulesetStatus = (typeof RULESET_STATUSES)[number];

export interface RulesetVersionSummary {
  version: string;
  status: RulesetStatus;
  publishedAt: string | null;
  createdAt: string;
  contentSha256: string;
  effectiveFrom: string;
  ruleCount: number;
  enabledRuleCount: number;
  localRuleCount: number;
  /** Where an amendment was copied from. */
  derivedFrom: { family: string; version: string } | null;
}

export interface RulesetFamilySummary {
  family: string;
  title: string;
  region: string | null;
  /** The organisation's own family (amendments) rather than a shipped one. */
  local: boolean;
  /** For a local family: the shipped family it amends. */
  basedOnFamily: string | null;
  /** The version new assessments and previews use: the latest published. */
  current: string | null;
  /** Drafts first, then published and retired versions, newest first. */
  versions: RulesetVersionSummary[];
}

export interface RulesetVersionDetail extends RulesetVersionSummary {
  family: string;
  familyTitle: string;
  local: boolean;
  content: RulesetVersion;
}

// ---------------------------------------------------------------------------------------------
// Amendments

/** `POST /api/rulesets/amendments`: a draft copy of a published version in the organisation's own family. */
export const AmendmentCreateSchema = z.strictObject({
  fromFamily: FamilySlugSchema,
  fromVersion: VersionLabelSchema,
  /** The local family to add the draft to; defaults to `<shipped family>-local`. */
  family: FamilySlugSchema.optional(),
});
export type AmendmentCreate = z.infer<typeof AmendmentCreateSchema>;

/** A new threshold: only the value changes, the unit stays what the rule says. */
export const ParamValueSchema = z.union([
  z.number('must be a number').finite('must be a finite number'),
  text(200),
  z.boolean(),
  z.array(z.union([text(200), z.number().finite()])).max(50, 'at most 50 values'),
]);

export const RuleChangeSchema = z
  .strictObject({
    severity: enumOf(SEVERITIES).optional(),
    enabled: z.boolean('must be true or false').optional(),
    params: z.record(questionKey, ParamValueSchema).optional(),
  })
  .refine(
    (c) => c.severity !== undefined || c.enabled !== undefined || c.params !== undefined,
    'say what changes: severity, enabled or params',
  );
export type RuleChange = z.infer<typeof RuleChangeSchema>;

const LocalQuestionSchema = z.strictObject({
  /** Generated from the rule's title when left out. */
  key: questionKey.optional(),
  section: enumOf(WALK_SECTIONS),
  prompt: text(300),
  whyItMatters: text(400),
});

/**
 * How a local requirement is judged. `answer_yes`: a new yes/no question, passing on yes.
 * `at_least` / `at_most`: a new measured question against a limit in the canonical unit of its
 * kind (mm, N, kg, m/s, s, V, A, deg, count). `condition`: JSON Logic over the version's facts,
 * as in a ruleset file, for what the two simple forms cannot say.
 */
export const LocalCheckSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('answer_yes'), question: LocalQuestionSchema }),
  z.strictObject({
    kind: z.enum(['at_least', 'at_most']),
    question: LocalQuestionSchema.extend({ measure: enumOf(MEASURED_ANSWER_TYPES) }),
    limit: z.number('must be a number').finite('must be a finite number').nonnegative('must not be negative'),
  }),
  z.strictObject({
    kind: z.literal('condition'),
    condition: z.json(),
    requires: z.array(z.string().max(120)).max(30),
    optional: z.array(z.string().max(120)).max(30).optional(),
    params: z
      .record(questionKey, z.strictObject({ value: z.number().finite(), unit: z.string().max(8) }))
      .optional(),
  }),
]);
export type LocalCheck = z.infer<typeof LocalCheckSchema>;

/** A requirement of a local code or of the authority having jurisdiction, with its own reference. */
export const LocalRuleSchema = z.strictObject({
  /** `local.<words>`; generated from the title when left out. */
  id: RuleIdSchema.refine(
    (id) => id.startsWith(LOCAL_RULE_PREFIX),
    `must start with "${LOCAL_RULE_PREFIX}"`,
  ).optional(),
  title: text(160),
  area: enumOf(HAZARD_AREAS),
  severity: enumOf(SEVERITIES),
  gateKinds: z.array(enumOf(GATE_KINDS)).min(1, 'name at least one gate kind').max(GATE_KINDS.length),
  usageClasses: z
    .array(
      z.union(
        USAGE_CLASSES.map((c) => z.literal(c)) as [
          z.ZodLiteral<1>,
          z.ZodLiteral<2>,
          z.ZodLiteral<3>,
          z.ZodLiteral<4>,
        ],
        'must be 1, 2, 3 or 4',
      ),
    )
    .min(1)
    .max(4)
    .optional(),
  check: LocalCheckSchema,
  /** The worst credible injury, a DPH key of the version's HRN table. */
  harm: z.string().regex(/^[a-z0-9_]{1,60}$/, 'must be a harm key of the HRN table'),
  remediation: text(600),
  caution: text(600),
  reference: z.strictObject({
    /** The local code or authority, e.g. "Brackenfold County fire code" or "Eastholm building department". */
    standard: text(200),
    clause: text(200),
    note: text(300).optional(),
  }),
});
export type LocalRule = z.infer<typeof LocalRuleSchema>;

/** `PATCH /api/rulesets/{family}/{version}` on a draft. */
export const AmendmentPatchSchema = z
  .strictObject({
    /** Changes to rules already in the draft, by rule id. */
    rules: z.record(z.string().max(120), RuleChangeSchema).optional(),
    addRules: z.array(LocalRuleSchema).max(20, 'add at most 20 rules at a time').optional(),
    /** Local rules to take out again (shipped rules are turned off instead). */
    removeRules: z.array(z.string().max(120)).max(100).optional(),
  })
  .refine(
    (p) => p.rules !== undefined || p.addRules !== undefined || p.removeRules !== undefined,
    'say what changes: rules, addRules or removeRules',
  );
export type AmendmentPatch = z.infer<typeof AmendmentPatchSchema>;

/** One problem with an amendment: the field of the request, or of the resulting ruleset (`ruleset.rules[12].condition`). */
export interface AmendmentProblem {
  field: string;
  message: string;
  ruleId?: string;
}
