/**
 * One gate's history: every assessment of it in visit order with its verdict and area scores
 * (for the trend), and the findings still open from the last visit, each with the visit it has
 * been failing since, so the next auditor knows what to look at first. Reads only the parts
 * of each stored result it needs (area scores, failing rule ids), not whole results.
 */
import type { Knex } from 'knex';
import { organisationAssessments } from './assessments';
import { archiveDateSql } from './archive-filters';
import { db } from './db';
import { iso } from './listing';
import { reinspectionOfGate, type GateReinspection } from './reinspection';

export interface GateVisit {
  assessmentId: string;
  date: string;
  status: string;
  verdict: 'clear' | 'remedy' | 'withdraw' | null;
  ruleset: { family: string; version: string; title: string };
  auditorName: string;
  /** 0–100 per hazard area, null where nothing applied; null when not scored yet. */
  areaScores: Record<string, number | null> | null;
  failedRuleIds: string[];
}

export interface OpenFinding {
  ruleId: string;
  title: string;
  area: string;
  severity: 'critical' | 'major' | 'minor';
  outcome: 'fail' | 'needs_info';
  remediation: string;
  /** Date of the earliest visit in the unbroken run of visits where this rule failed. */
  failingSince: string | null;
  /** How many visits in a row it has failed, ending with the last one. */
  visitsFailing: number;
}

export interface GateHistory {
  gate: {
    id: string;
    label: string;
    kind: string;
    siteId: string;
    address: string;
    city: string;
    usageClass: number;
    clientId: string;
    clientName: string;
  };
  visits: GateVisit[];
  /** The last scored visit the open findings come from (latest non-superseded with a result). */
  lastVisit: GateVisit | null;
  openFindings: OpenFinding[];
  reinspection: GateReinspection | null;
}

interface VisitRow {
  id: string;
  archive_date: Date;
  status: string;
  verdict: GateVisit['verdict'];
  family: string;
  ruleset_title: string;
  version: string;
  auditor_name: string;
  area_scores: Record<string, number | null> | null;
  failed_rule_ids: string[] | null;
}

const SEVERITY_ORDER = { critical: 0, major: 1, minor: 2 } as const;

export async function gateHistory(
  organisationId: string,
  gateId: string,
  knex: Knex = db(),
): Promise<GateHistory | null> {
  const gate = await knex('gates as g')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .where({ 'g.id': gateId, 'g.organisation_id': organisationId })
    .first(
      'g.id',
      'g.label',
      'g.kind',
      's.id as site_id',
      's.address_line1',
      's.city',
      's.usage_class',
      'c.id as client_id',
      'c.name as client_name',
    );
  if (!gate) return null;

  const rows = (await organisationAssessments(knex, organisationId)
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .join('users as u', 'u.id', 'a.auditor_id')
    .andWhere({ 'a.gate_id': gateId })
    .select(
      'a.id',
      knex.raw(`${archiveDateSql} as archive_date`),
      'a.status',
      'a.verdict',
      'r.family',
      'r.title as ruleset_title',
      'rv.version',
      'u.name as auditor_name',
      knex.raw(`a.result -> 'areaScores' as area_scores`),
      knex.raw(
        `jsonb_path_query_array(a.result, '$.findings[*] \\? (@.outcome == "fail").ruleId') as failed_rule_ids`,
      ),
    )
    .orderByRaw(`${archiveDateSql} asc, a.id asc`)) as VisitRow[];

  const visits: GateVisit[] = rows.map((row) => ({
    assessmentId: row.id,
    date: iso(row.archive_date),
    status: row.status,
    verdict: row.verdict,
    ruleset: { family: row.family, version: row.version, title: row.ruleset_title },
    auditorName: row.auditor_name,
    areaScores: row.area_scores,
    failedRuleIds: row.failed_rule_ids ?? [],
  }));

  const scored = visits.filter((v) => v.areaScores !== null && v.status !== 'superseded');
  const lastVisit = scored.at(-1) ?? null;
  const openFindings = lastVisit ? await openFindingsOf(knex, organisationId, lastVisit, scored) : [];
  return {
    gate: {
      id: gate.id,
      label: gate.label,
      kind: gate.kind,
      siteId: gate.site_id,
      address: gate.address_line1,
      city: gate.city,
      usageClass: gate.usage_class,
      clientId: gate.client_id,
      clientName: gate.client_name,
    },
    visits,
    lastVisit,
    openFindings,
    reinspection: await reinspectionOfGate(organisationId, gateId, knex),
  };
}

async function openFindingsOf(
  knex: Knex,
  organisationId: string,
  last: GateVisit,
  scored: GateVisit[],
): Promise<OpenFinding[]> {
  const row = await organisationAssessments(knex, organisationId)
    .andWhere({ 'a.id': last.assessmentId })
    .first<{ open: Omit<OpenFinding, 'failingSince' | 'visitsFailing'>[] | null }>(
      knex.raw(
        `jsonb_path_query_array(result, '$.findings[*] \\? (@.outcome == "fail" || @.outcome == "needs_info")') as open`,
      ),
    );
  const open = row?.open ?? [];
  const lastIndex = scored.indexOf(last);
  return open
    .map((finding) => {
      let since: GateVisit | null = null;
      let count = 0;
      if (finding.outcome === 'fail') {
        for (let i = lastIndex; i >= 0 && scored[i]!.failedRuleIds.includes(finding.ruleId); i--) {
          since = scored[i]!;
          count++;
        }
      }
      return {
        ruleId: finding.ruleId,
        title: finding.title,
        area: finding.area,
        severity: finding.severity,
        outcome: finding.outcome,
        remediation: finding.remediation,
        failingSince: since?.date ?? null,
        visitsFailing: count,
      };
    })
    .sort(
      (a, b) =>
        (a.outcome === b.outcome ? 0 : a.outcome === 'fail' ? -1 : 1) ||
        SEVERITY_ORDER[a.severity] - SEVERITY_ORDER[b.severity] ||
        b.visitsFailing - a.visitsFailing,
    );
}
