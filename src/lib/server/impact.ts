/**
 * Ruleset impact: what a newly published version would say about the gates already in the
 * archive. Every signed assessment of the family made under another version is re-scored in
 * memory against the new one — from its stored documents and the gate as it was scored
 * (`gate_snapshot`) — and compared with the verdict it was signed with. Nothing stored
 * changes: the archive keeps what was signed; this is a planning list for return visits.
 *
 * The ids to re-score are found first (one statement per version of the family, ids only), then
 * cut into slices; each slice's rows are read by primary key and scored as they come, yielding to
 * the event loop between slices, so memory holds the ids and one slice's rows and the server keeps
 * answering while a large archive is re-scored.
 *
 * `basis: 'latest'` (the default) looks at each gate's most recent signed assessment of the
 * family only — the gate's standing record; a gate already signed under the new version is
 * left out. `basis: 'all'` re-scores every signed assessment.
 */
import type { Knex } from 'knex';
import type {
  ImpactBasis,
  ImpactOutcome,
  ImpactReport,
  ImpactTarget,
  ResponsibleRule,
} from '@/lib/api/impact';
import {
  AssessmentInputError,
  assembleInput,
  scoreParsed,
  type Finding,
  type GateForScoring,
  type LoadedRuleset,
} from '@/lib/rules';
import {
  idsToRescore,
  rescoreRowsByIds,
  rescoreRowsInRange,
  signedRuleOutcomes,
  type ImpactRow,
  type RescoreScope,
  type SignedRuleOutcomes,
} from './assessments';
import { csvRow } from './csv';
import { db } from './db';
import { iso } from './listing';
import { acquireSharedPool, releaseSharedPool } from './impact-workers';
import { loadedRuleset } from './ruleset-cache';

type Verdict = 'clear' | 'remedy' | 'withdraw';
const VERDICT_RANK: Record<Verdict, number> = { clear: 0, remedy: 1, withdraw: 2 };

/** The published version `versionId` (a shipped family, or the organisation's own) and its family's other versions. */
export async function impactTarget(
  organisationId: string,
  versionId: string,
  knex: Knex = db(),
): Promise<ImpactTarget | null> {
  const target = await knex('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('rv.id', versionId)
    .whereIn('rv.status', ['published', 'retired'])
    .andWhere((w) => w.whereNull('r.organisation_id').orWhere('r.organisation_id', organisationId))
    .first('rv.id', 'rv.ruleset_id', 'r.family', 'rv.version', 'rv.published_at');
  if (!target) return null;
  const others = await knex('ruleset_versions')
    .where('ruleset_id', target.ruleset_id)
    .andWhereNot('id', versionId)
    .orderBy('created_at')
    .select('id', 'version');
  return {
    id: target.id,
    family: target.family,
    version: target.version,
    publishedAt: target.published_at ? iso(target.published_at) : null,
    otherVersions: others,
  };
}

/** Published versions that have a predecessor in their family: the ones an impact list makes sense for. */
export async function impactCandidates(
  organisationId: string,
  knex: Knex = db(),
): Promise<{ id: string; family: string; title: string; version: string; publishedAt: string | null }[]> {
  const rows = await knex('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('rv.status', 'published')
    .andWhere((w) => w.whereNull('r.organisation_id').orWhere('r.organisation_id', organisationId))
    .whereExists(
      knex('ruleset_versions as older')
        .whereRaw('older.ruleset_id = rv.ruleset_id')
        .andWhereRaw('older.id <> rv.id')
        .andWhereRaw('older.created_at <= rv.created_at')
        .select(knex.raw('1')),
    )
    .orderBy([{ column: 'r.family' }, { column: 'rv.published_at', order: 'desc' }])
    .select('rv.id', 'r.family', 'r.title', 'rv.version', 'rv.published_at');
  return rows.map((r) => ({
    id: r.id,
    family: r.family,
    title: r.title,
    version: r.version,
    publishedAt: r.published_at ? iso(r.published_at) : null,
  }));
}

async function loadTarget(knex: Knex, versionId: string): Promise<LoadedRuleset> {
  const { content_sha256: sha } = await knex('ruleset_versions')
    .where({ id: versionId })
    .first('content_sha256');
  return loadedRuleset(
    sha,
    async () => (await knex('ruleset_versions').where({ id: versionId }).first('content')).content,
  );
}

function gateForScoring(snapshot: ImpactRow['gate_snapshot']): GateForScoring | null {
  if (!snapshot || !snapshot.kind || !snapshot.leaves) return null;
  const usageClass = snapshot.usageClass ?? snapshot.site?.usageClass;
  if (!usageClass) return null;
  return {
    kind: snapshot.kind,
    leaves: snapshot.leaves,
    openingDirection: snapshot.openingDirection ?? null,
    widthMm: snapshot.widthMm ?? null,
    heightMm: snapshot.heightMm ?? null,
    weightKg: snapshot.weightKg ?? null,
    entered: snapshot.entered ?? {},
    operator: snapshot.operator ?? {},
    usageClass,
  } as GateForScoring;
}

/** The findings that set a verdict: critical fails for withdraw; major fails and unchecked criticals for remedy. */
function verdictDrivers(findings: readonly Finding[], verdict: Verdict): Finding[] {
  if (verdict === 'withdraw')
    return findings.filter((f) => f.severity === 'critical' && f.outcome === 'fail');
  if (verdict === 'remedy')
    return findings.filter(
      (f) =>
        (f.severity === 'major' && f.outcome === 'fail') ||
        (f.severity === 'critical' && f.outcome === 'needs_info'),
    );
  return [];
}

const SEVERITY_RANK = { critical: 0, major: 1, minor: 2 } as const;

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/** A finding behind a worse verdict, before it is compared with the signed result. */
type Driver = Pick<Finding, 'ruleId' | 'title' | 'area' | 'severity' | 'outcome'>;

/** The new verdict of one stored assessment, or why it could not be had. */
function rescoreVerdict(
  row: ImpactRow,
  target: LoadedRuleset,
): { after: Verdict; drivers: Driver[] } | { problem: string } {
  const gate = gateForScoring(row.gate_snapshot);
  if (!gate) return { problem: 'the gate as scored was not recorded' };
  const documents = {
    answers: row.answers ?? {},
    measurements: row.measurements ?? {},
    observations: row.observations ?? {},
  };
  // The same assembler as submit; the documents were checked when saved, so nothing is parsed.
  const { input, missing } = assembleInput(gate, documents);
  if (missing.length) return { problem: missing.map((m) => `${m.field}: ${m.message}`).join('; ') };
  let result: ReturnType<typeof scoreParsed>;
  try {
    result = scoreParsed(input, target);
  } catch (error) {
    if (error instanceof AssessmentInputError)
      return { problem: error.issues.map((i) => `${i.path}: ${i.message}`).join('; ') };
    // A stored record the engine cannot read at all is listed as unscorable, not the end of the run.
    return { problem: `could not be scored: ${error instanceof Error ? error.message : String(error)}` };
  }
  const drivers =
    VERDICT_RANK[result.verdict] > VERDICT_RANK[row.verdict]
      ? verdictDrivers(result.findings, result.verdict)
      : [];
  return {
    after: result.verdict,
    drivers: drivers.map(({ ruleId, title, area, severity, outcome }) => ({
      ruleId,
      title,
      area,
      severity,
      outcome,
    })),
  };
}

/** The rules responsible: drivers that were not already failing at this severity or worse when signed. */
function responsibleRules(drivers: Driver[], old: SignedRuleOutcomes): ResponsibleRule[] {
  return drivers
    .filter((f) => {
      const [outcome, severity] = old[f.ruleId] ?? ['absent', null];
      return !(
        outcome === f.outcome &&
        severity !== null &&
        SEVERITY_RANK[severity] <= SEVERITY_RANK[f.severity]
      );
    })
    .map((f) => {
      const [outcome, severity] = old[f.ruleId] ?? ['absent', null];
      return {
        ruleId: f.ruleId,
        title: f.title,
        area: f.area,
        severity: f.severity,
        outcome: f.outcome as 'fail' | 'needs_info',
        before: outcome,
        beforeSeverity: severity,
      };
    });
}

function baseOutcome(row: ImpactRow, fromVersion: string): Omit<ImpactOutcome, 'after' | 'change' | 'rules'> {
  return {
    assessmentId: row.id,
    gateId: row.gate_id,
    gateLabel: row.gate_label,
    gateKind: row.gate_kind,
    clientName: row.client_name,
    address: row.address_line1,
    city: row.city,
    visitDate: iso(row.archive_date),
    signedAt: row.signed_at ? iso(row.signed_at) : null,
    fromVersion,
    before: row.verdict,
  };
}

/** Re-scores stored assessments against the target version. */
export async function rescoreRows(
  knex: Knex,
  rows: ImpactRow[],
  target: LoadedRuleset,
  fromVersion: string,
): Promise<ImpactOutcome[]> {
  const scored: { row: ImpactRow; verdict: ReturnType<typeof rescoreVerdict> }[] = [];
  for (const row of rows) {
    scored.push({ row, verdict: rescoreVerdict(row, target) });
    // In the server's own thread, let other requests through every hundred or so.
    if (scored.length % 100 === 0) await yieldToEventLoop();
  }
  const worse = scored
    .filter((s) => 'after' in s.verdict && VERDICT_RANK[s.verdict.after] > VERDICT_RANK[s.row.verdict])
    .map((s) => s.row.id);
  const old = await signedRuleOutcomes(knex, worse);
  return scored.map(({ row, verdict }) => {
    const base = baseOutcome(row, fromVersion);
    if ('problem' in verdict)
      return { ...base, after: null, change: 'unscorable', rules: [], problem: verdict.problem };
    const delta = VERDICT_RANK[verdict.after] - VERDICT_RANK[row.verdict];
    if (delta <= 0)
      return { ...base, after: verdict.after, change: delta < 0 ? 'better' : 'same', rules: [] };
    return {
      ...base,
      after: verdict.after,
      change: 'worse',
      rules: responsibleRules(verdict.drivers, old.get(row.id) ?? {}),
    };
  });
}

/** Assessments per slice (IMPACT_SLICE_SIZE, for tests of the slicing; 1,000 by default). */
const BATCH = Math.min(10_000, Math.max(1, Number(process.env.IMPACT_SLICE_SIZE) || 1000));

/**
 * One slice of the work: at most BATCH of a version's assessments to re-score, by id (chosen
 * once, when the run's slices are cut). A slice queued by an older server carries the id range
 * (afterId, upToId] instead, and is read by range.
 */
export interface ImpactSlice extends RescoreScope {
  fromVersion: string;
  ids?: string[];
  afterId?: string | null;
  upToId?: string;
}

/** Slices of at most BATCH assessments each, for each other version of the family: one id query per version. */
export async function* slicesOf(
  knex: Knex,
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
): AsyncGenerator<ImpactSlice> {
  for (const from of target.otherVersions) {
    const scope = { organisationId, target, versionId: from.id, basis };
    const ids = await idsToRescore(knex, scope);
    for (let i = 0; i < ids.length; i += BATCH)
      yield { ...scope, fromVersion: from.version, ids: ids.slice(i, i + BATCH) };
  }
}

/** Reads and re-scores one slice in this thread (also what each worker thread runs). */
export async function rescoreSlice(slice: ImpactSlice, knex: Knex = db()): Promise<ImpactOutcome[]> {
  const [loaded, rows] = await Promise.all([
    loadTarget(knex, slice.target.id),
    slice.ids
      ? rescoreRowsByIds(knex, { ...slice, ids: slice.ids })
      : rescoreRowsInRange(knex, { ...slice, afterId: slice.afterId ?? null, upToId: slice.upToId ?? '' }),
  ]);
  return rescoreRows(knex, rows, loaded, slice.fromVersion);
}

// Worker threads find rescoreSlice here after importing this module (see impact-workers.ts).
(globalThis as Record<symbol, unknown>)[Symbol.for('latchwell.impact.rescoreSlice')] = rescoreSlice;

/** This module's URL: what a re-scoring thread imports (the bundled chunk in the built server). */
export const impactModuleUrl = import.meta.url;

/**
 * Re-scores the archive against `target`, one outcome per assessment considered, as an async
 * stream: callers count, list or write CSV without holding the whole archive. Large archives are
 * spread over the process's shared re-scoring threads (impact-workers.ts), each reading and
 * scoring its own slices; without threads, slices run here, one at a time, yielding to the event
 * loop in between.
 */
export async function* rescoreArchive(
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
  knex: Knex = db(),
  info: { workers: number } = { workers: 0 },
): AsyncGenerator<ImpactOutcome> {
  const slices = slicesOf(knex, organisationId, target, basis);
  const first = await slices.next();
  if (first.done) return;
  const second = await slices.next();
  if (second.done) {
    yield* await rescoreSlice(first.value, knex);
    return;
  }
  // The process's one pool: concurrent reports share its threads instead of starting their own.
  const pool = await acquireSharedPool(impactModuleUrl);
  info.workers = pool?.size ?? 0;
  try {
    // Two slices per worker in flight, or two here: one is read from the database while the
    // other is scored. Results come back in slice order.
    const limit = pool ? pool.size * 2 : 2;
    const inFlight: Promise<ImpactOutcome[]>[] = [];
    const start = (slice: ImpactSlice) => {
      const work = pool ? pool.run(slice) : rescoreSlice(slice, knex);
      work.catch(() => {}); // awaited below; this only keeps an abandoned one from being "unhandled"
      inFlight.push(work);
    };
    start(first.value);
    let next: IteratorResult<ImpactSlice> = second;
    for (;;) {
      while (!next.done && inFlight.length < limit) {
        start(next.value);
        next = await slices.next();
      }
      const oldest = inFlight.shift();
      if (!oldest) break;
      yield* await oldest;
      if (!pool) await yieldToEventLoop();
    }
  } finally {
    releaseSharedPool();
  }
}

export const worseFirst = (a: ImpactOutcome, b: ImpactOutcome) =>
  VERDICT_RANK[b.after ?? 'clear'] - VERDICT_RANK[a.after ?? 'clear'] ||
  a.clientName.localeCompare(b.clientName) ||
  a.gateLabel.localeCompare(b.gateLabel) ||
  a.assessmentId.localeCompare(b.assessmentId);

/** Counts every outcome and keeps the worse ones (up to `limit`, the most severe first). */
export async function impactReport(
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
  limit = 500,
  knex: Knex = db(),
): Promise<ImpactReport> {
  const started = performance.now();
  const counts = { considered: 0, worse: 0, better: 0, same: 0, unscorable: 0 };
  let items: ImpactOutcome[] = [];
  const unscorableSamples: ImpactReport['unscorableSamples'] = [];
  const info = { workers: 0 };
  for await (const outcome of rescoreArchive(organisationId, target, basis, knex, info)) {
    counts.considered++;
    counts[outcome.change]++;
    if (outcome.change === 'unscorable' && unscorableSamples.length < 10)
      unscorableSamples.push({
        assessmentId: outcome.assessmentId,
        gateLabel: outcome.gateLabel,
        problem: outcome.problem,
      });
    if (outcome.change !== 'worse') continue;
    items.push(outcome);
    // Keep memory bounded: trim to the most severe `limit` now and then.
    if (items.length >= limit * 2) items = items.sort(worseFirst).slice(0, limit);
  }
  items.sort(worseFirst);
  const { otherVersions, ...rest } = target;
  return {
    target: { ...rest, comparedWith: otherVersions.map((v) => v.version) },
    basis,
    ...counts,
    items: items.slice(0, limit),
    truncated: counts.worse > limit,
    unscorableSamples,
    workers: info.workers,
    durationMs: Math.round(performance.now() - started),
  };
}

const csvHeader = [
  'client',
  'address',
  'city',
  'gate',
  'gate_kind',
  'visit_date',
  'signed_at',
  'assessment_id',
  'signed_under',
  'verdict_signed',
  'verdict_under_new_version',
  'responsible_rules',
  'responsible_rule_titles',
];

/** The worse outcomes as CSV, written while the archive is re-scored. */
export function impactCsv(
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
  knex: Knex = db(),
): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  const outcomes = rescoreArchive(organisationId, target, basis, knex);
  let headerSent = false;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (!headerSent) {
        headerSent = true;
        controller.enqueue(encoder.encode(csvRow(csvHeader)));
        return;
      }
      try {
        for (;;) {
          const next = await outcomes.next();
          if (next.done) {
            controller.close();
            return;
          }
          const o = next.value;
          if (o.change !== 'worse') continue;
          controller.enqueue(
            encoder.encode(
              csvRow([
                o.clientName,
                o.address,
                o.city,
                o.gateLabel,
                o.gateKind,
                o.visitDate,
                o.signedAt,
                o.assessmentId,
                `${target.family} ${o.fromVersion}`,
                o.before,
                o.after,
                o.rules.map((r) => r.ruleId).join('; '),
                o.rules.map((r) => r.title).join('; '),
              ]),
            ),
          );
          return;
        }
      } catch (error) {
        console.error('[impact] CSV export failed:', error instanceof Error ? error.message : error);
        controller.error(error);
      }
    },
    async cancel() {
      await outcomes.return(undefined);
    },
  });
}
