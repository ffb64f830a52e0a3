/**
 * Sites: the properties where gates stand, each belonging to one client of the organisation.
 * A homeowner sees only the sites of the client they belong to.
 */
import type { Knex } from 'knex';
import { countAssessmentsOfGates } from './assessments';
import type { Page } from '@/lib/api/common';
import type { Site, SiteCreate, SiteListQuery, SitePatch } from '@/lib/api/sites';
import { changedColumns, insertAudited, recordByPerson } from './audit';
import { db } from './db';
import { ConflictError, InvalidInputError } from './errors';
import { containsPattern, fetchPage, iso } from './listing';
import type { SessionUser } from './session-user';

interface SiteRow {
  id: string;
  client_id: string;
  client_name: string;
  name: string | null;
  address_line1: string;
  address_line2: string | null;
  city: string;
  region: string | null;
  postal_code: string | null;
  country: string;
  usage_class: Site['usageClass'];
  notes: string | null;
  created_at: Date;
  updated_at: Date;
}

type WritableSiteRow = Partial<Omit<SiteRow, 'id' | 'client_name' | 'created_at' | 'updated_at'>>;

const columns = [
  's.id',
  's.client_id',
  'c.name as client_name',
  's.name',
  's.address_line1',
  's.address_line2',
  's.city',
  's.region',
  's.postal_code',
  's.country',
  's.usage_class',
  's.notes',
  's.created_at',
  's.updated_at',
] as const;

const sortColumns: Record<SiteListQuery['sort']['field'], string> = {
  addressLine1: 's.address_line1',
  city: 's.city',
  createdAt: 's.created_at',
  updatedAt: 's.updated_at',
};

function toSite(row: SiteRow): Site {
  return {
    id: row.id,
    clientId: row.client_id,
    clientName: row.client_name,
    name: row.name,
    addressLine1: row.address_line1,
    addressLine2: row.address_line2,
    city: row.city,
    region: row.region,
    postalCode: row.postal_code,
    country: row.country,
    usageClass: row.usage_class,
    notes: row.notes,
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
  };
}

function toRow(input: SiteCreate | SitePatch): WritableSiteRow {
  const row: WritableSiteRow = {};
  if (input.clientId !== undefined) row.client_id = input.clientId;
  if (input.name !== undefined) row.name = input.name;
  if (input.addressLine1 !== undefined) row.address_line1 = input.addressLine1;
  if (input.addressLine2 !== undefined) row.address_line2 = input.addressLine2;
  if (input.city !== undefined) row.city = input.city;
  if (input.region !== undefined) row.region = input.region;
  if (input.postalCode !== undefined) row.postal_code = input.postalCode;
  if (input.country !== undefined) row.country = input.country;
  if (input.usageClass !== undefined) row.usage_class = input.usageClass;
  if (input.notes !== undefined) row.notes = input.notes;
  return row;
}

/** The sites a viewer may see, joined to their client. */
function visibleSites(knex: Knex, viewer: SessionUser): Knex.QueryBuilder {
  const query = knex('sites as s')
    .join('clients as c', 'c.id', 's.client_id')
    .where('s.organisation_id', viewer.organisationId);
  if (viewer.role === 'homeowner') query.andWhere('s.client_id', viewer.clientId);
  return query;
}

export async function listSites(viewer: SessionUser, query: SiteListQuery): Promise<Page<Site>> {
  const base = visibleSites(db(), viewer);
  if (query.clientId) base.andWhere('s.client_id', query.clientId);
  if (query.usageClass) base.andWhere('s.usage_class', query.usageClass);
  if (query.q) {
    const pattern = containsPattern(query.q);
    base.andWhere((w) =>
      w
        .whereILike('s.name', pattern)
        .orWhereILike('s.address_line1', pattern)
        .orWhereILike('s.city', pattern)
        .orWhereILike('s.postal_code', pattern)
        .orWhereILike('c.name', pattern),
    );
  }
  return fetchPage<SiteRow, Site>(
    {
      base,
      columns,
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 's.id',
      map: toSite,
    },
    query,
  );
}

export async function getSite(viewer: SessionUser, id: string, knex: Knex = db()): Promise<Site | null> {
  const row = await visibleSites(knex, viewer).andWhere('s.id', id).first<SiteRow | undefined>(columns);
  return row ? toSite(row) : null;
}

/** A client id in a body must name a client of the viewer's organisation (422 otherwise). */
async function assertClientInOrganisation(knex: Knex, viewer: SessionUser, clientId: string): Promise<void> {
  const client = await knex('clients')
    .where({ id: clientId, organisation_id: viewer.organisationId })
    .forShare()
    .first('id');
  if (!client) throw InvalidInputError.field('clientId', 'no such client in this organisation');
}

/** Creates a site; the audit trail records it with the stored row. */
export async function createSite(
  viewer: SessionUser,
  input: SiteCreate,
  knex: Knex = db(),
  options: { ip?: string | null } = {},
): Promise<Site> {
  return knex.transaction(async (trx) => {
    await assertClientInOrganisation(trx, viewer, input.clientId);
    const created = await insertAudited(trx, viewer, options.ip, {
      table: 'sites',
      values: toRow(input),
      action: 'site.created',
      entityType: 'site',
      detail: (site) => ({ site }),
    });
    return (await getSite(viewer, created.id, trx)) as Site;
  });
}

/** Changes a site; the columns that changed are recorded in the audit trail with old and new values. */
export async function updateSite(
  viewer: SessionUser,
  id: string,
  patch: SitePatch,
  options: { ip?: string | null } = {},
): Promise<Site | null> {
  return db().transaction(async (trx) => {
    if (patch.clientId !== undefined) await assertClientInOrganisation(trx, viewer, patch.clientId);
    const before = await trx('sites')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first();
    if (!before) return null;
    const values = toRow(patch);
    const [after] = await trx('sites')
      .where({ id, organisation_id: viewer.organisationId })
      .update({ ...values, updated_at: trx.fn.now() })
      .returning('*');
    const changes = changedColumns(before, after, Object.keys(values));
    if (Object.keys(changes).length) {
      await recordByPerson(trx, viewer, options.ip, {
        action: 'site.updated',
        entityType: 'site',
        entityId: id,
        detail: { changes },
      });
    }
    return getSite(viewer, id, trx);
  });
}

/** Deletes a site with its gates; refused (409) while any of its gates has an assessment. */
export async function deleteSite(
  viewer: SessionUser,
  id: string,
  options: { ip?: string | null } = {},
): Promise<boolean> {
  return db().transaction(async (trx) => {
    const site = await trx('sites')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first('id');
    if (!site) return false;
    const gateIds = trx('gates').select('id').where({ organisation_id: viewer.organisationId, site_id: id });
    await gateIds.clone().forUpdate();
    const count = await countAssessmentsOfGates(trx, gateIds.clone());
    if (count > 0) {
      throw new ConflictError(
        `A gate at this site has ${count} assessment(s) on record, and assessments are kept; the site cannot be deleted.`,
      );
    }
    const gates = await trx('gates')
      .where({ organisation_id: viewer.organisationId, site_id: id })
      .delete()
      .returning<{ id: string; label: string }[]>(['id', 'label']);
    const [removed] = await trx('sites')
      .where({ organisation_id: viewer.organisationId, id })
      .delete()
      .returning('*');
    await recordByPerson(trx, viewer, options.ip, {
      action: 'site.deleted',
      entityType: 'site',
      entityId: id,
      detail: { site: removed, gatesDeleted: gates },
    });
    return true;
  });
}
