/** The ruleset impact list: its query (endpoint and CSV export) and what it answers (island and server). */
import { z } from 'zod';
import { IdSchema } from './common';

export const ImpactQuerySchema = z.strictObject({
  versionId: IdSchema,
  /** `latest`: each gate's most recent signed assessment of the family; `all`: every one. */
  basis: z.enum(['latest', 'all'], 'must be latest or all').default('latest'),
});
export type ImpactQuery = z.infer<typeof ImpactQuerySchema>;

export type ImpactBasis = ImpactQuery['basis'];
type Verdict = 'clear' | 'remedy' | 'withdraw';
type Severity = 'critical' | 'major' | 'minor';

export interface ImpactTarget {
  id: string;
  family: string;
  version: string;
  publishedAt: string | null;
  /** The versions whose assessments are re-scored: the family's others. */
  otherVersions: { id: string; version: string }[];
}

/** A rule behind a worse verdict, and how the same rule stood in the signed result. */
export interface ResponsibleRule {
  ruleId: string;
  title: string;
  area: string;
  severity: Severity;
  outcome: 'fail' | 'needs_info';
  /** Outcome in the signed result: `absent` when the old version had no such rule. */
  before: 'pass' | 'fail' | 'n/a' | 'needs_info' | 'absent';
  beforeSeverity: Severity | null;
}

export interface ImpactOutcome {
  assessmentId: string;
  gateId: string;
  gateLabel: string;
  gateKind: string;
  clientName: string;
  address: string;
  city: string;
  visitDate: string;
  signedAt: string | null;
  fromVersion: string;
  before: Verdict;
  after: Verdict | null;
  change: 'worse' | 'better' | 'same' | 'unscorable';
  rules: ResponsibleRule[];
  /** Why it could not be re-scored (input the new version refuses), when it could not. */
  problem?: string;
}

export interface ImpactReport {
  target: Omit<ImpactTarget, 'otherVersions'> & { comparedWith: string[] };
  basis: ImpactBasis;
  considered: number;
  worse: number;
  better: number;
  same: number;
  unscorable: number;
  /** Worse gates, withdraw first, then by client and gate; at most `limit` of them. */
  items: ImpactOutcome[];
  truncated: boolean;
  /** A few of the assessments that could not be re-scored, with why. */
  unscorableSamples: Pick<ImpactOutcome, 'assessmentId' | 'gateLabel' | 'problem'>[];
  /** Worker threads that re-scored (0: the server's own thread). */
  workers: number;
  durationMs: number;
}

/** A queued ruleset impact run (split into slices that any server instance takes) and its progress. */
export interface ImpactRunProgress {
  id: string;
  status: 'queued' | 'running' | 'done' | 'failed';
  reason: 'published' | 'requested';
  slicesTotal: number;
  slicesDone: number;
  /** How many server instances scored its slices so far. */
  instances: number;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  lastError: string | null;
}

/** GET /api/archive/impact/run: the latest run of a version and basis, with what it has found so far. */
export interface ImpactRunView {
  run: ImpactRunProgress | null;
  /** The counts and list so far (complete once `run.status` is `done`). */
  report: ImpactReport | null;
}
