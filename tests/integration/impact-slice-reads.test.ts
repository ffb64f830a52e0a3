/**
 * What a ruleset impact run reads of the archive: its slices are cut with one id statement per
 * version of the family (not one per slice), and a slice reads each of its own assessments once
 * (and a worse one once more, for its signed result): no other visit of the gate, no row of
 * another slice. Checked with PostgreSQL's own count of the assessment rows each statement read
 * (EXPLAIN ANALYZE of the statements the impact sent), on gates visited three times each, where
 * `latest` keeps only the last visit.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { ImpactOutcome } from '../../src/lib/api/impact';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
  type PublishedVersion,
} from './support/archive';
import { createOrganisation, type FixtureOrganisation } from './support/fixtures';

let org: FixtureOrganisation;
let v2015: PublishedVersion;
let v2026: PublishedVersion;
/** Each gate's visits, oldest first. */
const visits: string[][] = [];
const GATES = 12;
// The modules under test read these when they first load (slices of five: twelve gates, three slices).
process.env.DATABASE_URL = inject('databaseUrl');
process.env.IMPACT_SLICE_SIZE = '5';
const impact = await import('../../src/lib/server/impact');
const { db, closeDatabase } = await import('../../src/lib/server/db');

interface Statement {
  sql: string;
  bindings: unknown[];
}

/** The statements `work` sends through the app's database handle. */
async function statementsOf<T>(work: () => Promise<T>): Promise<{ value: T; statements: Statement[] }> {
  const statements: Statement[] = [];
  const listener = (q: { sql: string; bindings?: unknown[] }) =>
    statements.push({ sql: q.sql, bindings: [...(q.bindings ?? [])] });
  db().on('query', listener);
  try {
    return { value: await work(), statements };
  } finally {
    db().off('query', listener);
  }
}

type PlanNode = {
  'Relation Name'?: string;
  'Actual Rows': number;
  'Actual Loops': number;
  Plans?: PlanNode[];
};

/** Rows of `assessments` that PostgreSQL read for a statement (every scan of the table, all loops). */
async function assessmentRowsRead(statement: Statement): Promise<number> {
  const connection = await db().client.acquireConnection();
  try {
    const { rows } = await connection.query(
      `explain (analyze, format json) ${statement.sql}`,
      statement.bindings,
    );
    const walk = (node: PlanNode): number =>
      (node['Relation Name'] === 'assessments' ? node['Actual Rows'] * node['Actual Loops'] : 0) +
      (node.Plans ?? []).reduce((sum, child) => sum + walk(child), 0);
    return walk(rows[0]['QUERY PLAN'][0].Plan);
  } finally {
    await db().client.releaseConnection(connection);
  }
}

beforeAll(async () => {
  org = await createOrganisation('impact-reads');
  [v2015, v2026] = await Promise.all([
    publishedVersion('north-american-gate', '2015.1'),
    publishedVersion('north-american-gate', '2026.1'),
  ]);
  const prng = createPrng(7311);
  const client = await addClient(org.id, 'Saltmere Court Association');
  const site = await addSite(org.id, client, '4 Heron Way', 'Northwick', 2);
  for (let g = 0; g < GATES; g++) {
    const gate = sampleGate(prng);
    const gateId = await addGate(org.id, site, `Gate ${g + 1}`, gate);
    const filed: string[] = [];
    for (const year of [2023, 2024, 2025]) {
      const { id } = await fileAssessment({
        organisationId: org.id,
        auditorId: org.auditor.id,
        gateId,
        gate,
        usageClass: 2,
        version: v2015,
        documents: sampleDocuments(prng, v2015.loaded.version),
        visitedOn: `${year}-05-${String(10 + g).padStart(2, '0')}T09:00:00Z`,
      });
      filed.push(id);
    }
    visits.push(filed);
  }
});

afterAll(async () => {
  await closeDatabase();
});

describe('ruleset impact reads', () => {
  it('cuts a run into slices with one id statement per version, and a slice reads only its own assessments', async () => {
    const target = (await impact.impactTarget(org.id, v2026.id))!;
    expect(target.otherVersions.length).toBeGreaterThanOrEqual(1);

    const { value: slices, statements: slicing } = await statementsOf(async () => {
      const found = [];
      for await (const slice of impact.slicesOf(db(), org.id, target, 'latest')) found.push(slice);
      return found;
    });
    // Twelve gates' last visits in slices of five, found with one statement per other version.
    expect(slicing).toHaveLength(target.otherVersions.length);
    expect(slices.map((s) => s.ids?.length)).toEqual([5, 5, 2]);
    const lastVisits = visits.map((v) => v[2]!).sort();
    expect(slices.flatMap((s) => s.ids)).toEqual(lastVisits);

    const everything: ImpactOutcome[] = [];
    for (const slice of slices) {
      const { value: outcomes, statements } = await statementsOf(() => impact.rescoreSlice(slice, db()));
      everything.push(...outcomes);
      const worse = outcomes.filter((o) => o.change === 'worse').length;
      let read = 0;
      for (const statement of statements)
        if (/^\s*select/i.test(statement.sql)) read += await assessmentRowsRead(statement);
      // Each of the slice's assessments once, and each worse one once more (its signed result).
      expect(read).toBe(slice.ids!.length + worse);
    }
    expect(everything.map((o) => o.assessmentId)).toEqual(lastVisits);
    expect(everything.every((o) => o.change !== 'unscorable')).toBe(true);

    // A slice queued by an older server names an id range instead of ids: read by range, the same.
    const { ids: _ids, ...scope } = slices[0]!;
    const ranged = await impact.rescoreSlice({ ...scope, afterId: null, upToId: lastVisits.at(-1)! }, db());
    expect(ranged).toEqual(everything);

    // The same report as re-scoring every visit and keeping the last of each gate.
    const all = await impact.impactReport(org.id, target, 'all', 500, db());
    expect(all.considered).toBe(GATES * 3);
    const report = await impact.impactReport(org.id, target, 'latest', 500, db());
    expect(report.considered).toBe(GATES);
    expect(report.items.map((o) => o.assessmentId).sort()).toEqual(
      everything
        .filter((o) => o.change === 'worse')
        .map((o) => o.assessmentId)
        .sort(),
    );
  }, 90_000);
});
