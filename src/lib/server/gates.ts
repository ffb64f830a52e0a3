/**
 * Gates: what stands at a site. Dimensions are stored in mm / kg with what was entered kept
 * beside them (`entered`), and operator facts as a small JSON document. A homeowner sees only
 * the gates at their own client's sites.
 */
import type { Knex } from 'knex';
import { countAssessmentsOfGates } from './assessments';
import type { Page } from '@/lib/api/common';
import type {
  EnteredValue,
  Gate,
  GateCreate,
  GateListQuery,
  GatePatch,
  OperatorFacts,
} from '@/lib/api/gates';
import { applyMergePatch } from '@/lib/merge-patch';
import { changedColumns, insertAudited, recordByPerson } from './audit';
import { db } from './db';
import { ConflictError, InvalidInputError } from './errors';
import { containsPattern, fetchPage, iso } from './listing';
import type { SessionUser } from './session-user';

interface GateRow {
  id: string;
  site_id: string;
  client_id: string;
  label: string;
  kind: Gate['kind'];
  leaves: Gate['leaves'];
  opening_direction: Gate['openingDirection'];
  width_mm: number | null;
  height_mm: number | null;
  weight_kg: number | null;
  entered: Gate['entered'];
  operator: OperatorFacts;
  installed_on: string | null;
  next_inspection_due: string | null;
  created_at: Date;
  updated_at: Date;
}

const columns = (knex: Knex) => [
  'g.id',
  'g.site_id',
  's.client_id',
  'g.label',
  'g.kind',
  'g.leaves',
  'g.opening_direction',
  'g.width_mm',
  'g.height_mm',
  'g.weight_kg',
  'g.entered',
  'g.operator',
  // Dates as text: a JS Date would shift them by the server's time zone.
  knex.raw('g.installed_on::text as installed_on'),
  knex.raw('g.next_inspection_due::text as next_inspection_due'),
  'g.created_at',
  'g.updated_at',
];

const sortColumns: Record<GateListQuery['sort']['field'], string> = {
  label: 'g.label',
  nextInspectionDue: 'g.next_inspection_due',
  createdAt: 'g.created_at',
  updatedAt: 'g.updated_at',
};

function toGate(row: GateRow): Gate {
  return {
    id: row.id,
    siteId: row.site_id,
    clientId: row.client_id,
    label: row.label,
    kind: row.kind,
    leaves: row.leaves,
    openingDirection: row.opening_direction,
    widthMm: row.width_mm,
    heightMm: row.height_mm,
    weightKg: row.weight_kg,
    entered: row.entered ?? {},
    operator: row.operator ?? {},
    installedOn: row.installed_on,
    nextInspectionDue: row.next_inspection_due,
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
  };
}

const dimensionColumn = { width: 'width_mm', height: 'height_mm', weight: 'weight_kg' } as const;

/**
 * Columns to write for a create or a patch. `entered` is merged with what the row held, and
 * operator facts merge key by key (a null removes one), as in a JSON merge patch.
 */
function toRow(
  input: GateCreate | GatePatch,
  previous: Pick<Gate, 'entered' | 'operator'> = { entered: {}, operator: {} },
): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  if (input.siteId !== undefined) row.site_id = input.siteId;
  if (input.label !== undefined) row.label = input.label;
  if (input.kind !== undefined) row.kind = input.kind;
  if (input.leaves !== undefined) row.leaves = input.leaves;
  if (input.openingDirection !== undefined) row.opening_direction = input.openingDirection;
  if (input.installedOn !== undefined) row.installed_on = input.installedOn;
  if (input.nextInspectionDue !== undefined) row.next_inspection_due = input.nextInspectionDue;
  if (input.operator !== undefined)
    row.operator = JSON.stringify(applyMergePatch(previous.operator, withoutUndefined(input.operator)));
  const entered: Partial<Record<keyof typeof dimensionColumn, EnteredValue>> = { ...previous.entered };
  let enteredChanged = false;
  for (const dimension of ['width', 'height', 'weight'] as const) {
    const value = input.dimensions[dimension];
    if (value === undefined) continue;
    enteredChanged = true;
    row[dimensionColumn[dimension]] = value?.stored ?? null;
    if (value) entered[dimension] = value.entered;
    else delete entered[dimension];
  }
  if (enteredChanged) row.entered = JSON.stringify(entered);
  return row;
}

function withoutUndefined<T extends object>(value: T): T {
  return Object.fromEntries(Object.entries(value).filter(([, v]) => v !== undefined)) as T;
}

/** The gates a viewer may see, joined to their site (for the client). */
function visibleGates(knex: Knex, viewer: SessionUser): Knex.QueryBuilder {
  const query = knex('gates as g')
    .join('sites as s', 's.id', 'g.site_id')
    .where('g.organisation_id', viewer.organisationId);
  if (viewer.role === 'homeowner') query.andWhere('s.client_id', viewer.clientId);
  return query;
}

export async function listGates(viewer: SessionUser, query: GateListQuery): Promise<Page<Gate>> {
  const knex = db();
  const base = visibleGates(knex, viewer);
  if (query.siteId) base.andWhere('g.site_id', query.siteId);
  if (query.clientId) base.andWhere('s.client_id', query.clientId);
  if (query.kind) base.andWhere('g.kind', query.kind);
  if (query.dueBy) base.andWhere('g.next_inspection_due', '<=', query.dueBy);
  if (query.q) base.andWhereILike('g.label', containsPattern(query.q));
  return fetchPage<GateRow, Gate>(
    {
      base,
      columns: columns(knex),
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 'g.id',
      map: toGate,
    },
    query,
  );
}

export async function getGate(viewer: SessionUser, id: string, knex: Knex = db()): Promise<Gate | null> {
  const row = await visibleGates(knex, viewer).andWhere('g.id', id).first<GateRow | undefined>(columns(knex));
  return row ? toGate(row) : null;
}

async function assertSiteInOrganisation(knex: Knex, viewer: SessionUser, siteId: string): Promise<void> {
  const site = await knex('sites')
    .where({ id: siteId, organisation_id: viewer.organisationId })
    .forShare()
    .first('id');
  if (!site) throw InvalidInputError.field('siteId', 'no such site in this organisation');
}

/** Creates a gate; the audit trail records it with the stored row. */
export async function createGate(
  viewer: SessionUser,
  input: GateCreate,
  knex: Knex = db(),
  options: { ip?: string | null } = {},
): Promise<Gate> {
  return knex.transaction(async (trx) => {
    await assertSiteInOrganisation(trx, viewer, input.siteId);
    const created = await insertAudited(trx, viewer, options.ip, {
      table: 'gates',
      values: { operator: '{}', ...toRow(input) },
      action: 'gate.created',
      entityType: 'gate',
      detail: (gate) => ({ gate }),
    });
    return (await getGate(viewer, created.id, trx)) as Gate;
  });
}

/**
 * A new gate on the same site with the profile of `id` (kind, leaves, direction, sizes as
 * entered, weight, operator facts, install date): for a site with several gates alike. Only the
 * label differs; assessments, re-inspection dates and history stay with the original.
 */
export async function duplicateGate(
  viewer: SessionUser,
  id: string,
  label: string,
  options: { ip?: string | null } = {},
): Promise<Gate | null> {
  return db().transaction(async (trx) => {
    const source = await trx('gates')
      .where({ id, organisation_id: viewer.organisationId })
      .forShare()
      .first(
        'site_id',
        'kind',
        'leaves',
        'opening_direction',
        'width_mm',
        'height_mm',
        'weight_kg',
        'entered',
        'operator',
        'installed_on',
      );
    if (!source) return null;
    // The copy is the record; `gateId` names the original, so the original's history lists it too.
    const copy = await insertAudited(trx, viewer, options.ip, {
      table: 'gates',
      values: {
        ...source,
        entered: JSON.stringify(source.entered ?? {}),
        operator: JSON.stringify(source.operator ?? {}),
        label,
      },
      action: 'gate.duplicated',
      entityType: 'gate',
      detail: (gate) => ({ gateId: id, gate }),
    });
    return (await getGate(viewer, copy.id, trx)) as Gate;
  });
}

/** Changes a gate; the columns that changed are recorded in the audit trail with old and new values. */
export async function updateGate(
  viewer: SessionUser,
  id: string,
  patch: GatePatch,
  options: { ip?: string | null } = {},
): Promise<Gate | null> {
  return db().transaction(async (trx) => {
    const before = await trx('gates')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first();
    if (!before) return null;
    if (patch.siteId !== undefined) await assertSiteInOrganisation(trx, viewer, patch.siteId);
    const values = toRow(patch, before);
    const [after] = await trx('gates')
      .where({ id, organisation_id: viewer.organisationId })
      .update({ ...values, updated_at: trx.fn.now() })
      .returning('*');
    const changes = changedColumns(before, after, Object.keys(values));
    if (Object.keys(changes).length) {
      await recordByPerson(trx, viewer, options.ip, {
        action: 'gate.updated',
        entityType: 'gate',
        entityId: id,
        detail: { changes },
      });
    }
    return getGate(viewer, id, trx);
  });
}

/** Deletes a gate; refused (409) while it has an assessment on record. */
export async function deleteGate(
  viewer: SessionUser,
  id: string,
  options: { ip?: string | null } = {},
): Promise<boolean> {
  return db().transaction(async (trx) => {
    const gate = await trx('gates')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first('id');
    if (!gate) return false;
    const count = await countAssessmentsOfGates(trx, [id]);
    if (count > 0) {
      throw new ConflictError(
        `This gate has ${count} assessment(s) on record, and assessments are kept; the gate cannot be deleted.`,
      );
    }
    const [removed] = await trx('gates')
      .where({ organisation_id: viewer.organisationId, id })
      .delete()
      .returning('*');
    await recordByPerson(trx, viewer, options.ip, {
      action: 'gate.deleted',
      entityType: 'gate',
      entityId: id,
      detail: { gate: removed },
    });
    return true;
  });
}
