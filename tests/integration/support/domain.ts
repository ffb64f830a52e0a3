/**
 * Rows for the domain API tests, written straight through Knex so a test can set up what it
 * needs without depending on the endpoints it is testing. Everything invented; e-mails use
 * the reserved .test domain.
 */
import { randomBytes } from 'node:crypto';
import { testDb, type FixtureOrganisation } from './fixtures';

const suffix = () => randomBytes(3).toString('hex');

export async function insertClient(
  organisationId: string,
  fields: Record<string, unknown> = {},
): Promise<string> {
  const [row] = await testDb()('clients')
    .insert({
      organisation_id: organisationId,
      name: `Tallowmere Lettings ${suffix()}`,
      kind: 'property_manager',
      contact_email: `desk.${suffix()}@lettings.test`,
      ...fields,
    })
    .returning('id');
  return row.id;
}

export async function insertSite(
  organisationId: string,
  clientId: string,
  fields: Record<string, unknown> = {},
): Promise<string> {
  const [row] = await testDb()('sites')
    .insert({
      organisation_id: organisationId,
      client_id: clientId,
      address_line1: `${Math.floor(Math.random() * 900) + 10} Brackenfold Road`,
      city: 'Eastholm',
      usage_class: 1,
      ...fields,
    })
    .returning('id');
  return row.id;
}

/** A swing gate with everything the engine needs from the gate row. */
export async function insertGate(
  organisationId: string,
  siteId: string,
  fields: Record<string, unknown> = {},
): Promise<string> {
  const [row] = await testDb()('gates')
    .insert({
      organisation_id: organisationId,
      site_id: siteId,
      label: `Driveway gate ${suffix()}`,
      kind: 'swing',
      leaves: 'double',
      opening_direction: 'pull_to_open',
      width_mm: 3660,
      height_mm: 1520,
      weight_kg: 140,
      entered: JSON.stringify({
        width: { value: 12, unit: 'ft' },
        height: { value: 1520, unit: 'mm' },
        weight: { value: 140, unit: 'kg' },
      }),
      operator: JSON.stringify({
        listed: true,
        automaticClosing: false,
        manufacturedOn: '2019-05-01',
        mounting: 'post',
        power: 'low_voltage_dc',
      }),
      installed_on: '2019-06-20',
      ...fields,
    })
    .returning('id');
  return row.id;
}

/** The id and label of a family's current published version, as a draft would be pinned to. */
export async function currentVersion(family: string): Promise<{ id: string; version: string }> {
  const row = await testDb()('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .whereNull('r.organisation_id')
    .andWhere({ 'r.family': family, 'rv.status': 'published' })
    .orderBy('rv.published_at', 'desc')
    .first('rv.id', 'rv.version');
  if (!row) throw new Error(`no published version of ${family} in the test database`);
  return row;
}

/** The shipped families published into the test database, newest first by family name. */
export async function publishedFamilies(): Promise<string[]> {
  const rows = await testDb()('rulesets as r')
    .join('ruleset_versions as rv', 'rv.ruleset_id', 'r.id')
    .whereNull('r.organisation_id')
    .andWhere('rv.status', 'published')
    .distinct('r.family')
    .orderBy('r.family');
  return rows.map((r) => r.family);
}

export async function insertDraft(
  organisationId: string,
  gateId: string,
  auditorId: string,
  rulesetVersionId: string,
  fields: Record<string, unknown> = {},
): Promise<string> {
  const [row] = await testDb()('assessments')
    .insert({
      organisation_id: organisationId,
      gate_id: gateId,
      auditor_id: auditorId,
      ruleset_version_id: rulesetVersionId,
      purpose: 'inspection',
      visited_on: testDb().fn.now(),
      ...fields,
    })
    .returning('id');
  return row.id;
}

/** A client, site and gate of the organisation (beside the fixture's homeowner client). */
export interface Directory {
  clientId: string;
  siteId: string;
  gateId: string;
  /** A site and gate under the fixture homeowner's own client. */
  homeSiteId: string;
  homeGateId: string;
}

export async function seedDirectory(org: FixtureOrganisation): Promise<Directory> {
  const clientId = await insertClient(org.id);
  const siteId = await insertSite(org.id, clientId, { usage_class: 2 });
  const gateId = await insertGate(org.id, siteId, { next_inspection_due: '2027-03-01' });
  const homeSiteId = await insertSite(org.id, org.clientId);
  const homeGateId = await insertGate(org.id, homeSiteId);
  return { clientId, siteId, gateId, homeSiteId, homeGateId };
}

/** Every row of the tables, in a stable order, for before/after comparisons. */
export async function snapshotTables(
  organisationId: string,
  tables = ['clients', 'sites', 'gates', 'assessments'] as const,
): Promise<Record<string, unknown[]>> {
  const out: Record<string, unknown[]> = {};
  for (const table of tables)
    out[table] = await testDb()(table).where({ organisation_id: organisationId }).orderBy('id').select('*');
  const [{ count }] = await testDb()('audit_events')
    .where({ organisation_id: organisationId })
    .count({ count: '*' });
  out.audit_events = [Number(count)];
  return out;
}

/** An organisation-local ruleset version in draft, so assessment rows can exist without the shipped files. */
export async function insertLocalVersion(organisationId: string): Promise<string> {
  const [ruleset] = await testDb()('rulesets')
    .insert({ organisation_id: organisationId, family: `local-${suffix()}`, title: 'Local test family' })
    .returning('id');
  const [version] = await testDb()('ruleset_versions')
    .insert({
      ruleset_id: ruleset.id,
      version: '2026.1',
      content: JSON.stringify({ questions: [] }),
      content_sha256: '0'.repeat(64),
    })
    .returning('id');
  return version.id;
}
