/**
 * Re-inspection reminders through the mail outbox: one digest to the office listing every gate
 * that became due (or overdue) since the last run, and, when the organisation enables it, one
 * message to each client about their own gates. Each carries an .ics calendar of the due
 * dates. A (gate, due date, recipient) is reminded once: `reinspection_reminders` has a unique
 * key and rows are claimed with ON CONFLICT DO NOTHING, so two runs at once never double-mail.
 *
 * A gate awaiting its fixes (withdrawn at its last signed visit) has no date: it is listed in
 * words ("re-visit when the fixes are reported"), once per withdrawn visit (keyed by that visit's
 * date, see reminderKeyOf), and gets no calendar entry: any date put in a calendar would be made
 * up, and an all-day entry on a made-up day would read as a booked visit.
 */
import type { Knex } from 'knex';
import type { SessionOrganisation } from './session-user';
import { recordAudit } from './audit';
import { linkOrigin } from './auth/public-origin';
import { db } from './db';
import { calendarOf, type DueEvent } from './ics';
import { enqueueMail, wakeOutboxWorker } from './outbox';
import { formatCalendarDate } from '@/lib/vocabulary';
import {
  AWAITING_FIXES_WORDS,
  DUE_SOON_DAYS,
  dueGates,
  dueWordsOf,
  reminderKeyOf,
  type DueGate,
} from './reinspection';
import { storage } from './storage';

export interface ReminderActor {
  userId: string | null;
  label: string;
  ip: string | null;
}

export interface ReminderOutcome {
  /** Gates newly reminded to the office. */
  officeGates: number;
  /** Messages queued to clients. */
  clientMessages: number;
  /** Due gates skipped because they had been reminded for this due date already. */
  alreadyReminded: number;
}

/** The calendar entry of a gate with a due date; null for one awaiting fixes (it has no date). */
export function dueEventOf(
  gate: Pick<DueGate, 'gateId' | 'gateLabel' | 'siteAddress' | 'siteCity' | 'clientName' | 'dueOn'>,
  organisationName: string,
): DueEvent | null {
  if (gate.dueOn === null) return null;
  return {
    uid: `reinspection-${gate.gateId}-${gate.dueOn}@latchwell`,
    date: gate.dueOn,
    summary: `Gate re-inspection due: ${gate.gateLabel} (${gate.clientName})`,
    description: `${organisationName}: the safety re-inspection of "${gate.gateLabel}" at ${gate.siteAddress}, ${gate.siteCity} is due on ${gate.dueOn}.`,
    location: `${gate.siteAddress}, ${gate.siteCity}`,
  };
}

const hasEvent = (event: DueEvent | null): event is DueEvent => event !== null;

function dueLine(gate: DueGate): string {
  if (gate.dueOn === null || gate.daysLeft === null)
    return `- ${gate.gateLabel}, ${gate.siteAddress}, ${gate.siteCity} (${gate.clientName}): withdrawn from service on ${formatCalendarDate(gate.lastSignedVisit)}, ${AWAITING_FIXES_WORDS}`;
  return `- ${gate.gateLabel}, ${gate.siteAddress}, ${gate.siteCity} (${gate.clientName}): ${formatCalendarDate(gate.dueOn)}, ${dueWordsOf(gate)}`;
}

/** The .ics attachment of the gates that have a date; none when every gate awaits fixes. */
async function calendarAttachments(gates: DueGate[], organisationName: string, name: string) {
  const events = gates.map((g) => dueEventOf(g, organisationName)).filter(hasEvent);
  return events.length ? [await storeCalendar(events, name)] : [];
}

async function storeCalendar(events: DueEvent[], name: string) {
  const bytes = Buffer.from(calendarOf(events, name), 'utf8');
  const stored = await storage().put(bytes, 'text/calendar');
  return {
    filename: 'reinspection.ics',
    contentType: 'text/calendar; charset=utf-8',
    storageKey: stored.key,
  };
}

/** Who reads office mail: the active office staff, or the owners when there are none. */
async function officeAddresses(knex: Knex, organisationId: string): Promise<string[]> {
  const rows = await knex('users')
    .where({ organisation_id: organisationId, active: true })
    .whereIn('role', ['office', 'owner'])
    .select('email', 'role');
  const office = rows.filter((r) => r.role === 'office');
  return (office.length ? office : rows).map((r) => String(r.email));
}

/** Claims the (gate, due date, recipient) rows not reminded yet; returns the gate ids claimed. */
async function claim(
  trx: Knex.Transaction,
  organisationId: string,
  gates: DueGate[],
  recipient: 'office' | 'client',
): Promise<Set<string>> {
  if (!gates.length) return new Set();
  const rows = await trx('reinspection_reminders')
    .insert(
      gates.map((g) => ({
        organisation_id: organisationId,
        gate_id: g.gateId,
        due_on: reminderKeyOf(g),
        recipient,
      })),
    )
    .onConflict(['gate_id', 'due_on', 'recipient'])
    .ignore()
    .returning('gate_id');
  return new Set(rows.map((r: { gate_id: string }) => r.gate_id));
}

/** Queues reminders for every gate overdue or due within DUE_SOON_DAYS that has not had one. */
export async function queueReinspectionReminders(
  organisation: SessionOrganisation,
  actor: ReminderActor,
): Promise<ReminderOutcome> {
  const knex = db();
  const due = await dueGates(organisation.id, DUE_SOON_DAYS, knex);
  const outcome: ReminderOutcome = { officeGates: 0, clientMessages: 0, alreadyReminded: 0 };
  if (!due.length) return outcome;
  const dashboard = `${linkOrigin()}/archive/reinspection`;

  await knex.transaction(async (trx) => {
    const claimedOffice = await claim(trx, organisation.id, due, 'office');
    const officeGates = due.filter((g) => claimedOffice.has(g.gateId));
    outcome.alreadyReminded = due.length - officeGates.length;
    const office = await officeAddresses(trx, organisation.id);
    if (officeGates.length && office.length) {
      const attachments = await calendarAttachments(
        officeGates,
        organisation.name,
        `${organisation.name}: re-inspections`,
      );
      const dated = officeGates.filter((g) => g.dueOn !== null);
      const awaiting = officeGates.filter((g) => g.dueOn === null);
      const messageId = await enqueueMail(trx, {
        organisationId: organisation.id,
        kind: 'reinspection_reminder',
        to: office,
        subject: `Re-inspection due: ${officeGates.length} gate${officeGates.length === 1 ? '' : 's'}`,
        text: [
          ...(awaiting.length
            ? [
                'These gates were withdrawn from service and await their fixes (no date: re-visit when the fixes are reported):',
                '',
                ...awaiting.map(dueLine),
                '',
              ]
            : []),
          ...(dated.length
            ? [
                'These gates are due (or overdue) for their safety re-inspection:',
                '',
                ...dated.map(dueLine),
                '',
              ]
            : []),
          attachments.length
            ? `The attached calendar file has one all-day entry per gate with a date${awaiting.length ? ' (none for gates awaiting fixes)' : ''}.`
            : 'No calendar file: none of these gates has a date yet.',
          ...(dashboard ? ['', `Plan the visits: ${dashboard}`] : []),
        ].join('\n'),
        attachments,
        relatedType: 'organisation',
        relatedId: organisation.id,
      });
      await trx('reinspection_reminders')
        .whereIn('gate_id', [...claimedOffice])
        .andWhere('recipient', 'office')
        .whereNull('outbox_message_id')
        .update({ outbox_message_id: messageId });
      outcome.officeGates = officeGates.length;
    }

    if (organisation.remindClients) {
      const withEmail = due.filter((g) => g.clientEmail);
      const claimedClient = await claim(trx, organisation.id, withEmail, 'client');
      const byClient = new Map<string, DueGate[]>();
      for (const gate of withEmail.filter((g) => claimedClient.has(g.gateId)))
        byClient.set(gate.clientId, [...(byClient.get(gate.clientId) ?? []), gate]);
      for (const gates of byClient.values()) {
        const first = gates[0]!;
        const attachments = await calendarAttachments(
          gates,
          organisation.name,
          `${organisation.name}: gate re-inspection`,
        );
        const dated = gates.filter((g) => g.dueOn !== null);
        const awaiting = gates.filter((g) => g.dueOn === null);
        const messageId = await enqueueMail(trx, {
          organisationId: organisation.id,
          kind: 'reinspection_reminder_client',
          to: [first.clientEmail!],
          subject: `Your gate is due for its safety re-inspection`,
          text: [
            `Hello ${first.clientName},`,
            '',
            ...(dated.length
              ? [
                  `${organisation.name} inspected your automatic gate${dated.length === 1 ? '' : 's'} and recommends a safety re-inspection by:`,
                  '',
                  ...dated.map((g) => `- ${g.gateLabel}, ${g.siteAddress}, ${g.siteCity}: ${g.dueOn}`),
                  '',
                ]
              : []),
            ...(awaiting.length
              ? [
                  `${awaiting.length === 1 ? 'This gate was' : 'These gates were'} withdrawn from service at the last inspection; we re-visit when the fixes are reported:`,
                  '',
                  ...awaiting.map(
                    (g) => `- ${g.gateLabel}, ${g.siteAddress}, ${g.siteCity}: ${AWAITING_FIXES_WORDS}`,
                  ),
                  '',
                ]
              : []),
            `Reply to this message or call us to book a visit.${attachments.length ? ' The attached calendar file adds the date to your calendar.' : ''}`,
            '',
            organisation.name,
          ].join('\n'),
          attachments,
          relatedType: 'client',
          relatedId: first.clientId,
        });
        await trx('reinspection_reminders')
          .whereIn(
            'gate_id',
            gates.map((g) => g.gateId),
          )
          .andWhere('recipient', 'client')
          .whereNull('outbox_message_id')
          .update({ outbox_message_id: messageId });
        outcome.clientMessages++;
      }
    }

    if (outcome.officeGates || outcome.clientMessages) {
      await recordAudit(trx, {
        organisationId: organisation.id,
        actorUserId: actor.userId,
        actorLabel: actor.label,
        action: 'reinspection.reminders_queued',
        entityType: 'organisation',
        entityId: organisation.id,
        ip: actor.ip,
        detail: {
          officeGates: outcome.officeGates,
          clientMessages: outcome.clientMessages,
          gateIds: officeGates.map((g) => g.gateId).slice(0, 200),
        },
      });
    }
  });
  if (outcome.officeGates || outcome.clientMessages) wakeOutboxWorker();
  return outcome;
}
