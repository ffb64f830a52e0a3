/** The contracting organisation's own row: its name and the owner's display settings. */
import type { OrganisationPatch } from '@/lib/api/organisation';
import { recordAudit } from './audit';
import { db } from './db';
import type { Actor } from './users';
import type { SessionOrganisation } from './session-user';

export interface OrganisationRow {
  id: string;
  name: string;
  slug: string;
  display_units: 'imperial' | 'metric';
  time_zone: string;
  reinspection_months: number;
  remind_clients: boolean;
}

export const organisationColumns = [
  'id',
  'name',
  'slug',
  'display_units',
  'time_zone',
  'reinspection_months',
  'remind_clients',
] as const;

export function toSessionOrganisation(row: OrganisationRow): SessionOrganisation {
  return {
    id: row.id,
    name: row.name,
    slug: row.slug,
    displayUnits: row.display_units,
    timeZone: row.time_zone,
    reinspectionMonths: row.reinspection_months,
    remindClients: row.remind_clients,
  };
}

export async function getOrganisation(id: string): Promise<SessionOrganisation | null> {
  const row = await db()('organisations')
    .where({ id })
    .first<OrganisationRow | undefined>(organisationColumns);
  return row ? toSessionOrganisation(row) : null;
}

const columnOf: Record<keyof OrganisationPatch, keyof OrganisationRow> = {
  name: 'name',
  displayUnits: 'display_units',
  timeZone: 'time_zone',
  reinspectionMonths: 'reinspection_months',
  remindClients: 'remind_clients',
};

/** Applies the owner's changes and records what changed from what. */
export async function updateOrganisation(
  id: string,
  patch: OrganisationPatch,
  actor: Actor,
): Promise<SessionOrganisation | null> {
  return db().transaction(async (trx) => {
    const before = await trx('organisations')
      .where({ id })
      .forUpdate()
      .first<OrganisationRow | undefined>(organisationColumns);
    if (!before) return null;
    const changes: Partial<Record<keyof OrganisationRow, unknown>> = {};
    const detail: Record<string, { from: unknown; to: unknown }> = {};
    for (const [field, value] of Object.entries(patch) as [keyof OrganisationPatch, unknown][]) {
      const column = columnOf[field];
      if (value === undefined || before[column] === value) continue;
      changes[column] = value;
      detail[field] = { from: before[column], to: value };
    }
    if (Object.keys(changes).length === 0) return toSessionOrganisation(before);
    const [after] = await trx('organisations')
      .where({ id })
      .update(changes)
      .returning<OrganisationRow[]>(organisationColumns);
    await recordAudit(trx, {
      organisationId: id,
      actorUserId: actor.user.id,
      actorLabel: actor.user.email,
      action: 'organisation.settings_changed',
      entityType: 'organisation',
      entityId: id,
      ip: actor.ip,
      detail,
    });
    return toSessionOrganisation(after);
  });
}
