/**
 * Re-inspection: when each gate should be looked at again, and the reminders that say so.
 *
 * A gate is due `reinspection_months` (an organisation setting, 12 by default) after the visit
 * of its last signed assessment: the visit is when the gate was inspected; signing may follow
 * days later. A date the office set on the gate itself (`next_inspection_due`) wins when it is
 * later than that visit; one set before the last visit is stale and ignored. A gate with no
 * signed assessment and no date set is not due for anything yet.
 *
 * Dates are days in the organisation's time zone ("today" included).
 */
import type { Knex } from 'knex';
import { db } from './db';

export type DueState = 'overdue' | 'due' | 'later';

export interface GateReinspection {
  dueOn: string;
  /** `interval`: last signed visit + the organisation's interval; `set`: the date on the gate. */
  source: 'interval' | 'set';
  lastSignedVisit: string | null;
  lastSignedAssessmentId: string | null;
  lastVerdict: 'clear' | 'remedy' | 'withdraw' | null;
  state: DueState;
  /** Negative when overdue. */
  daysLeft: number;
}

export interface DueGate extends GateReinspection {
  gateId: string;
  gateLabel: string;
  gateKind: string;
  siteAddress: string;
  siteCity: string;
  clientId: string;
  clientName: string;
  clientEmail: string | null;
  lastReminderAt: string | null;
}

/** Days before the due date from which a gate counts as due (dashboard and reminders). */
export const DUE_SOON_DAYS = 30;

interface DueRow {
  gate_id: string;
  gate_label: string;
  gate_kind: string;
  site_address: string;
  site_city: string;
  client_id: string;
  client_name: string;
  client_email: string | null;
  due_on: string;
  source: 'interval' | 'set';
  last_visit: string | null;
  last_assessment_id: string | null;
  last_verdict: GateReinspection['lastVerdict'];
  days_left: number;
  last_reminder_at: Date | null;
}

/**
 * Every gate of the organisation that has a due date, with that date. `gateId` narrows it to one
 * gate; `dueWithinDays` keeps those due on or before today + that many days.
 */
function dueGatesQuery(knex: Knex, organisationId: string, options: { gateId?: string; dueWithinDays?: number }): Knex.Raw {
  const bindings: Knex.RawBinding[] = [organisationId, organisationId];
  let gateFilter = '';
  if (options.gateId) {
    gateFilter = 'and g.id = ?';
    bindings.push(options.gateId);
  }
  let dueFilter = '';
  if (options.dueWithinDays !== undefined) {
    dueFilter = 'where due.due_on <= due.today + ?::int';
    bindings.push(options.dueWithinDays);
  }
  return knex.raw(
    `with org as (
       select id, time_zone, reinspection_months, (now() at time zone time_zone)::date as today from organisations where id = ?
     ),
     last_signed as (
       select distinct on (a.gate_id) a.gate_id, a.id, a.verdict, (coalesce(a.visited_on, a.created_at) at time zone org.time_zone)::date as visit
       from assessments a cross join org
       where a.organisation_id = org.id and a.status = 'signed'
       order by a.gate_id, coalesce(a.visited_on, a.created_at) desc
     ),
     due as (
       select g.id as gate_id, g.label as gate_label, g.kind as gate_kind, s.address_line1 as site_address, s.city as site_city,
              c.id as client_id, c.name as client_name, c.contact_email::text as client_email,
              ls.visit, ls.id as last_assessment_id, ls.verdict as last_verdict, org.today,
              case when g.next_inspection_due is not null and (ls.visit is null or g.next_inspection_due > ls.visit)
                   then g.next_inspection_due
                   else (ls.visit + make_interval(months => org.reinspection_months))::date end as due_on,
              case when g.next_inspection_due is not null and (ls.visit is null or g.next_inspection_due > ls.visit)
                   then 'set' else 'interval' end as source
       from gates g
       cross join org
       join sites s on s.id = g.site_id
       join clients c on c.id = s.client_id
       left join last_signed ls on ls.gate_id = g.id
       where g.organisation_id = ? ${gateFilter} and (ls.gate_id is not null or g.next_inspection_due is not null)
     )
     select due.gate_id, due.gate_label, due.gate_kind, due.site_address, due.site_city, due.client_id, due.client_name, due.client_email,
            due.due_on::text as due_on, due.source, due.visit::text as last_visit, due.last_assessment_id, due.last_verdict,
            (due.due_on - due.today) as days_left,
            (select max(rr.created_at) from reinspection_reminders rr where rr.gate_id = due.gate_id and rr.due_on = due.due_on) as last_reminder_at
     from due ${dueFilter}
     order by due.due_on, due.gate_label, due.gate_id`,
    bindings,
  );
}

const stateOf = (daysLeft: number): DueState => (daysLeft < 0 ? 'overdue' : daysLeft <= DUE_SOON_DAYS ? 'due' : 'later');

function toDueGate(row: DueRow): DueGate {
  const daysLeft = Number(row.days_left);
  return {
    gateId: row.gate_id,
    gateLabel: row.gate_label,
    gateKind: row.gate_kind,
    siteAddress: row.site_address,
    siteCity: row.site_city,
    clientId: row.client_id,
    clientName: row.client_name,
    clientEmail: row.client_email,
    dueOn: row.due_on,
    source: row.source,
    lastSignedVisit: row.last_visit,
    lastSignedAssessmentId: row.last_assessment_id,
    lastVerdict: row.last_verdict,
    state: stateOf(daysLeft),
    daysLeft,
    lastReminderAt: row.last_reminder_at ? new Date(row.last_reminder_at).toISOString() : null,
  };
}

/** Gates overdue or due within `withinDays` (default DUE_SOON_DAYS), soonest first. */
export async function dueGates(organisationId: string, withinDays = DUE_SOON_DAYS, knex: Knex = db()): Promise<DueGate[]> {
  const result = await dueGatesQuery(knex, organisationId, { dueWithinDays: withinDays });
  return (result.rows as DueRow[]).map(toDueGate);
}

export async function reinspectionOfGate(organisationId: string, gateId: string, knex: Knex = db()): Promise<DueGate | null> {
  const result = await dueGatesQuery(knex, organisationId, { gateId });
  const row = (result.rows as DueRow[])[0];
  return row ? toDueGate(row) : null;
}
