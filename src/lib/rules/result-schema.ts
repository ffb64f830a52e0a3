/**
 * The scoring result as read back from storage: strict. A stored result that does not match
 * (a finding without a severity, an unknown outcome, a verdict the engine never gives) is an
 * error for the caller to report, never a default — a report must not print a critical
 * finding as minor because a field was malformed. Fields the engine added over time and the
 * report does not read are allowed, not required.
 */
import { z } from 'zod';
import type { ScoreResult } from './result-types';
import { OUTCOMES, SEVERITIES, VERDICTS } from './vocabulary';

const FindingSchema = z.object({
  ruleId: z.string().min(1),
  title: z.string().min(1),
  area: z.string().min(1),
  severity: z.enum(SEVERITIES),
  outcome: z.enum(OUTCOMES),
  missing: z.array(z.object({ key: z.string(), prompt: z.string() })),
  observed: z.record(z.string(), z.unknown()),
  params: z.record(z.string(), z.object({ value: z.unknown(), unit: z.string().optional() })),
  hrn: z.object({ value: z.number(), band: z.string() }).optional(),
  remediation: z.string(),
  caution: z.string(),
  reference: z.object({ standard: z.string(), clause: z.string(), note: z.string().optional() }),
});

export const StoredResultSchema = z.object({
  ruleset: z.object({ family: z.string().min(1), version: z.string().min(1), contentSha256: z.string() }),
  verdict: z.enum(VERDICTS),
  complete: z.boolean(),
  findings: z.array(FindingSchema),
  areaScores: z.record(z.string(), z.number().nullable()),
});
export type StoredResult = z.infer<typeof StoredResultSchema>;
export type StoredFinding = z.infer<typeof FindingSchema>;

// Whatever the engine returns must read back: a result it produces always parses.
const engineResultReadsBack = (r: ScoreResult): z.input<typeof StoredResultSchema> => r;
void engineResultReadsBack;
