/**
 * Re-inspection: when each gate should be looked at again, and the reminders that say so.
 *
 * The last signed assessment decides (its visit is when the gate was inspected; signing may
 * follow days later):
 * - its result carries a re-inspection plan (ruleset versions that declare one, by verdict and
 *   usage class): due that many days after the visit (`source: 'result'`);
 * - the plan says "when the fixes are reported" (a withdrawn gate): no date; the gate is
 *   `awaiting_fixes`, always listed as needing attention, never "not due" (`source: 'result'`);
 * - the result has no plan (older ruleset versions): due `reinspection_months` (an organisation
 *   setting, 12 by default) after the visit (`source: 'interval'`).
 * A date the office set on the gate itself (`next_inspection_due`) wins over all of these when it
 * is later than that visit (`source: 'set'`); one set before the last visit is stale and ignored.
 * A gate with no signed assessment and no date set is not due for anything yet.
 *
 * Dates are days in the organisation's time zone ("today" included).
 */
import type { Knex } from 'knex';
import { daysFromNow, formatCalendarDate } from '@/lib/vocabulary';
import { lastSignedOfEachGateSql } from './assessments';
import { db } from './db';

/** `awaiting_fixes`: withdrawn at the last signed visit; re-visit when the fixes are reported (no date). */
export type DueState = 'overdue' | 'due' | 'later' | 'awaiting_fixes';

/** What a gate awaiting its fixes shows instead of a date. */
export const AWAITING_FIXES_WORDS = 're-visit when the fixes are reported';

export interface GateReinspection {
  /** Null only when `state` is `awaiting_fixes`. */
  dueOn: string | null;
  /**
   * `result`: the last signed result's own plan (days after the visit, or awaiting fixes);
   * `interval`: last signed visit + the organisation's months (results without a plan);
   * `set`: the date on the gate.
   */
  source: 'result' | 'interval' | 'set';
  /** Days after the visit the last signed result asks for (`source: 'result'` with a date), else null. */
  resultAfterDays: number | null;
  lastSignedVisit: string | null;
  lastSignedAssessmentId: string | null;
  lastVerdict: 'clear' | 'remedy' | 'withdraw' | null;
  state: DueState;
  /** Negative when overdue; null when awaiting fixes. */
  daysLeft: number | null;
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
  due_on: string | null;
  source: GateReinspection['source'];
  plan: 'after_days' | 'fixes_reported' | null;
  plan_days: number | null;
  last_visit: string | null;
  last_assessment_id: string | null;
  last_verdict: GateReinspection['lastVerdict'];
  days_left: number | null;
  last_reminder_at: Date | null;
}

/**
 * Every gate of the organisation that has a due date (or awaits its fixes), with that date.
 * `gateId` narrows it to one gate; `dueWithinDays` keeps those due on or before today + that many
 * days, and those awaiting fixes whatever the window.
 */
function dueGatesQuery(
  knex: Knex,
  organisationId: string,
  options: { gateId?: string; dueWithinDays?: number },
): Knex.Raw {
  const bindings: Knex.RawBinding[] = [organisationId, organisationId];
  let gateFilter = '';
  if (options.gateId) {
    gateFilter = 'and g.id = ?';
    bindings.push(options.gateId);
  }
  let dueFilter = '';
  if (options.dueWithinDays !== undefined) {
    dueFilter = 'where due.due_on is null or due.due_on <= due.today + ?::int';
    bindings.push(options.dueWithinDays);
  }
  return knex.raw(
    `with org as (
       select id, time_zone, reinspection_months, (now() at time zone time_zone)::date as today from organisations where id = ?
     ),
     last_signed as (
       ${lastSignedOfEachGateSql()}
     ),
     planned as (
       -- The result's own plan, read defensively: a malformed one counts as no plan.
       select ls.*,
              case when ls.plan ->> 'when' = 'fixes_reported' then 'fixes_reported'
                   when ls.plan ->> 'when' = 'after_days' and jsonb_typeof(ls.plan -> 'afterDays') = 'number'
                        and (ls.plan ->> 'afterDays')::numeric between 1 and 3660 then 'after_days' end as plan_when,
              case when ls.plan ->> 'when' = 'after_days' and jsonb_typeof(ls.plan -> 'afterDays') = 'number'
                        and (ls.plan ->> 'afterDays')::numeric between 1 and 3660 then round((ls.plan ->> 'afterDays')::numeric)::int end as plan_days
       from last_signed ls
     ),
     due as (
       select g.id as gate_id, g.label as gate_label, g.kind as gate_kind, s.address_line1 as site_address, s.city as site_city,
              c.id as client_id, c.name as client_name, c.contact_email::text as client_email,
              ls.visit, ls.id as last_assessment_id, ls.verdict as last_verdict, org.today, ls.plan_when, ls.plan_days,
              case when g.next_inspection_due is not null and (ls.visit is null or g.next_inspection_due > ls.visit)
                   then g.next_inspection_due
                   when ls.plan_when = 'fixes_reported' then null
                   when ls.plan_when = 'after_days' then ls.visit + ls.plan_days
                   else (ls.visit + make_interval(months => org.reinspection_months))::date end as due_on,
              case when g.next_inspection_due is not null and (ls.visit is null or g.next_inspection_due > ls.visit)
                   then 'set'
                   when ls.plan_when is not null then 'result'
                   else 'interval' end as source
       from gates g
       cross join org
       join sites s on s.id = g.site_id
       join clients c on c.id = s.client_id
       left join planned ls on ls.gate_id = g.id
       where g.organisation_id = ? ${gateFilter} and (ls.gate_id is not null or g.next_inspection_due is not null)
     )
     select due.gate_id, due.gate_label, due.gate_kind, due.site_address, due.site_city, due.client_id, due.client_name, due.client_email,
            due.due_on::text as due_on, due.source, due.plan_when as plan, due.plan_days, due.visit::text as last_visit, due.last_assessment_id, due.last_verdict,
            (due.due_on - due.today) as days_left,
            (select max(rr.created_at) from reinspection_reminders rr where rr.gate_id = due.gate_id and rr.due_on = coalesce(due.due_on, due.visit)) as last_reminder_at
     from due ${dueFilter}
     order by due.due_on nulls first, due.gate_label, due.gate_id`,
    bindings,
  );
}

const stateOf = (daysLeft: number | null): DueState =>
  daysLeft === null
    ? 'awaiting_fixes'
    : daysLeft < 0
      ? 'overdue'
      : daysLeft <= DUE_SOON_DAYS
        ? 'due'
        : 'later';

/**
 * The date a reminder about this gate is keyed by (`reinspection_reminders.due_on`): the due
 * date, or for a gate awaiting fixes the withdrawn visit's date. A due date is always after the
 * visit (a set date only counts when later), so the two never collide, and a new withdrawn visit
 * gives a new reminder.
 */
export function reminderKeyOf(gate: Pick<GateReinspection, 'dueOn' | 'lastSignedVisit'>): string {
  const key = gate.dueOn ?? gate.lastSignedVisit;
  if (!key) throw new Error('a gate awaiting fixes always has a last signed visit');
  return key;
}

function toDueGate(row: DueRow): DueGate {
  const daysLeft = row.due_on === null || row.days_left === null ? null : Number(row.days_left);
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
    resultAfterDays: row.source === 'result' && row.plan === 'after_days' ? Number(row.plan_days) : null,
    lastSignedVisit: row.last_visit,
    lastSignedAssessmentId: row.last_assessment_id,
    lastVerdict: row.last_verdict,
    state: stateOf(daysLeft),
    daysLeft,
    lastReminderAt: row.last_reminder_at ? new Date(row.last_reminder_at).toISOString() : null,
  };
}

/** Gates awaiting fixes, then those overdue or due within `withinDays` (default DUE_SOON_DAYS), soonest first. */
export async function dueGates(
  organisationId: string,
  withinDays = DUE_SOON_DAYS,
  knex: Knex = db(),
): Promise<DueGate[]> {
  const result = await dueGatesQuery(knex, organisationId, { dueWithinDays: withinDays });
  return (result.rows as DueRow[]).map(toDueGate);
}

export async function reinspectionOfGate(
  organisationId: string,
  gateId: string,
  knex: Knex = db(),
): Promise<DueGate | null> {
  const result = await dueGatesQuery(knex, organisationId, { gateId });
  const row = (result.rows as DueRow[])[0];
  return row ? toDueGate(row) : null;
}

/** How far off the gate is, in words: "3 days overdue", "due today", "in 12 days", or awaiting fixes. */
export function dueWordsOf(gate: Pick<GateReinspection, 'daysLeft'>): string {
  const days = gate.daysLeft;
  if (days === null) return `awaiting fixes: ${AWAITING_FIXES_WORDS}`;
  return days === 0 ? 'due today' : daysFromNow(days);
}

/** Where the gate's date (or state) comes from, in words, for the archive pages. */
export function dueSourceWords(
  gate: Pick<GateReinspection, 'source' | 'resultAfterDays' | 'lastSignedVisit' | 'state'>,
  reinspectionMonths: number,
): string {
  if (gate.source === 'set') return 'Date set on the gate.';
  if (gate.state === 'awaiting_fixes')
    return `Withdrawn from service at the last signed visit (${formatCalendarDate(gate.lastSignedVisit)}): ${AWAITING_FIXES_WORDS}.`;
  if (gate.source === 'result')
    return `${gate.resultAfterDays} days after the last signed visit (${formatCalendarDate(gate.lastSignedVisit)}), as its result's ruleset asks.`;
  return `${reinspectionMonths} month${reinspectionMonths === 1 ? '' : 's'} after the last signed visit (${formatCalendarDate(gate.lastSignedVisit)}): the organisation's setting, as its result's ruleset version gives no interval.`;
}
