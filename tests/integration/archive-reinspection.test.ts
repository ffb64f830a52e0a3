/**
 * Re-inspection: due dates from the last signed visit and the organisation's interval (or a
 * later date set on the gate), the dashboard of due and overdue gates, reminder e-mails through
 * the outbox to the office and (when enabled) the client, sent once per due date, and the .ics.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { DueGate } from '../../src/lib/server/reinspection';
import { createPrng, sampleGate } from '../support/archive-samples';
import {
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { addClient, addGate, addSite, expectJson, fileAssessment, publishedVersion } from './support/archive';

let org: FixtureOrganisation;
let office: TestClient;
const gates: Record<string, string> = {};
const clientEmail = `bookings.${Date.now()}@harbourview.test`;

/** A date `months` from today (UTC) on the 15th at noon, as ISO; and its calendar date. */
function monthsFromNow(months: number): { at: string; day: string } {
  const d = new Date();
  const shifted = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + months, 15, 12));
  return { at: shifted.toISOString(), day: shifted.toISOString().slice(0, 10) };
}
const plusYear = (day: string) => `${Number(day.slice(0, 4)) + 1}${day.slice(4)}`;

beforeAll(async () => {
  org = await createOrganisation('reinspection');
  await testDb()('organisations')
    .where({ id: org.id })
    .update({ remind_clients: true, reinspection_months: 12 });
  office = await signIn(org.office.email, fixturePassword);
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(4242);
  const client = await addClient(org.id, 'Harbourview Moorings', clientEmail);
  const site = await addSite(org.id, client, '2 Quayside Walk', 'Saltmere', 2);
  const file = async (name: string, visit: string | null, fields: Record<string, unknown> = {}) => {
    const gate = sampleGate(prng);
    gates[name] = await addGate(org.id, site, `${name} gate`, gate, fields);
    if (visit)
      await fileAssessment({
        organisationId: org.id,
        gateId: gates[name]!,
        auditorId: org.auditor.id,
        version,
        gate,
        usageClass: 2,
        visitedOn: visit,
        prng,
      });
  };
  await file('Overdue', monthsFromNow(-13).at);
  // Due on this month's 15th: within a month either side of today.
  await file('Soon', monthsFromNow(-12).at);
  await file('Later', monthsFromNow(-2).at);
  await file('Rescheduled', monthsFromNow(-13).at, { next_inspection_due: monthsFromNow(6).day });
  await file('Unsigned', null);
});

describe('re-inspection', () => {
  it('lists overdue and soon-due gates with their due date, 12 months after the last signed visit unless a later date is set', async () => {
    const { gates: due } = await expectJson<{ gates: DueGate[] }>(
      await office.fetch('/api/archive/reinspection'),
    );
    const byId = new Map(due.map((g) => [g.gateId, g]));
    expect(byId.get(gates.Overdue!)).toMatchObject({
      state: 'overdue',
      source: 'interval',
      dueOn: plusYear(monthsFromNow(-13).day),
    });
    expect(byId.get(gates.Overdue!)!.daysLeft).toBeLessThan(0);
    expect(byId.get(gates.Soon!)).toMatchObject({ dueOn: plusYear(monthsFromNow(-12).day) });
    expect(Math.abs(byId.get(gates.Soon!)!.daysLeft!)).toBeLessThanOrEqual(31);
    expect(byId.has(gates.Later!)).toBe(false);
    expect(byId.has(gates.Rescheduled!)).toBe(false);
    expect(byId.has(gates.Unsigned!)).toBe(false);
    // A wider window shows the rescheduled gate with the date set on it.
    const wide = await expectJson<{ gates: DueGate[] }>(
      await office.fetch('/api/archive/reinspection?within=365'),
    );
    expect(wide.gates.find((g) => g.gateId === gates.Rescheduled)).toMatchObject({
      source: 'set',
      dueOn: monthsFromNow(6).day,
      state: 'later',
    });
  });

  it('queues one office digest and one client message through the outbox, and never twice for the same due date', async () => {
    const [seenOffice, seenClient] = await Promise.all([
      caughtMailIds(org.office.email),
      caughtMailIds(clientEmail),
    ]);
    const first = await expectJson<{ officeGates: number; clientMessages: number; alreadyReminded: number }>(
      await office.fetch('/api/archive/reinspection/reminders', { method: 'POST' }),
      202,
    );
    expect(first).toMatchObject({ officeGates: 2, clientMessages: 1, alreadyReminded: 0 });
    const rows = await testDb()('outbox_messages')
      .where({ organisation_id: org.id })
      .whereIn('kind', ['reinspection_reminder', 'reinspection_reminder_client'])
      .select('kind', 'to_addresses', 'attachments');
    expect(rows.map((r) => r.kind).sort()).toEqual(['reinspection_reminder', 'reinspection_reminder_client']);
    expect(rows.find((r) => r.kind === 'reinspection_reminder_client')!.to_addresses).toEqual([clientEmail]);
    expect(rows.every((r) => r.attachments[0]?.filename === 'reinspection.ics')).toBe(true);

    const mail = await waitForMail(org.office.email, seenOffice, 15_000);
    expect(mail.subject).toBe('Re-inspection due: 2 gates');
    expect(mail.text).toContain('Overdue gate');
    expect(mail.text).toContain('Soon gate');
    const clientMail = await waitForMail(clientEmail, seenClient, 15_000);
    expect(clientMail.text).toContain('2 Quayside Walk');

    const second = await expectJson(
      await office.fetch('/api/archive/reinspection/reminders', { method: 'POST' }),
      202,
    );
    expect(second).toEqual({ officeGates: 0, clientMessages: 0, alreadyReminded: 2 });
    const audit = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'reinspection.reminders_queued' })
      .count({ n: '*' });
    expect(Number(audit[0]!.n)).toBe(1);
  });

  it('gives each gate its due date as an all-day calendar event', async () => {
    const res = await office.fetch(`/api/archive/gates/${gates.Overdue}/reinspection.ics`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('text/calendar; charset=utf-8');
    const ics = await res.text();
    const due = plusYear(monthsFromNow(-13).day).replaceAll('-', '');
    expect(ics).toMatch(/^BEGIN:VCALENDAR\r\n/);
    expect(ics).toContain(`DTSTART;VALUE=DATE:${due}\r\n`);
    expect(ics).toContain(`UID:reinspection-${gates.Overdue}-`);
    expect(ics.replace(/\r\n /g, '')).toContain(
      'SUMMARY:Gate re-inspection due: Overdue gate (Harbourview Moorings)',
    );
    expect((await office.fetch(`/api/archive/gates/${gates.Unsigned}/reinspection.ics`)).status).toBe(404);
  });

  it('shows the dashboard and queues reminders from its button', async () => {
    const page = await (await office.fetch('/archive/reinspection')).text();
    expect(page).toContain('Overdue gate');
    expect(page).not.toContain('Later gate');
    const posted = await office.fetch('/archive/reinspection', { method: 'POST' });
    expect(posted.status).toBe(303);
    expect(posted.headers.get('location')).toBe('/archive/reinspection?queued=0&clients=0&skipped=2');
  });

  it('keeps a gate label with line breaks, commas and semicolons inside one escaped SUMMARY of the .ics', async () => {
    const label = 'Rescheduled gate\rX-INJECTED:1\nBEGIN:VEVENT\r\nSUMMARY:Injected; a, b\\c\r\nEND:VEVENT';
    const patched = await office.fetch(`/api/gates/${gates.Rescheduled}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ label }),
    });
    expect(patched.status).toBe(200);
    const res = await office.fetch(`/api/archive/gates/${gates.Rescheduled}/reinspection.ics`);
    expect(res.status).toBe(200);
    const ics = await res.text();
    const raw = ics.slice(0, -2).split('\r\n');
    // Every line is a property or a folded continuation; no CR or LF inside a line.
    for (const line of raw)
      expect(line, JSON.stringify(line)).toMatch(
        /^(?:[A-Za-z0-9-]+(?:;[A-Za-z0-9-]+=[^:;]*)*:|[ \t])[^\r\n]*$/,
      );
    const lines = ics.replace(/\r\n[ \t]/g, '').split('\r\n');
    expect(lines.filter((l) => l === 'BEGIN:VEVENT')).toHaveLength(1);
    expect(lines.filter((l) => l.startsWith('X-INJECTED'))).toHaveLength(0);
    expect(lines.filter((l) => l.startsWith('SUMMARY'))).toEqual([
      'SUMMARY:Gate re-inspection due: Rescheduled gate\\nX-INJECTED:1\\nBEGIN:VEVENT\\nSUMMARY:Injected\\; a\\, b\\\\c\\nEND:VEVENT (Harbourview Moorings)',
    ]);
  });
});
