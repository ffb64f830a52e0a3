/**
 * Re-inspection due dates from the last signed result's own plan: a result carrying a
 * `reinspection` plan is due that many days after its visit (by verdict and usage class, as the
 * ruleset version's data says), a withdrawn gate has no date and awaits its fixes (always listed,
 * no calendar entry), a result from a version without a plan keeps the organisation's months,
 * and a later date set on the gate still wins. Over real HTTP and the real database.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { scoreParsed } from '../../src/lib/rules';
import { buildEngineInput } from '../../src/lib/server/assessment-input';
import type { DueGate } from '../../src/lib/server/reinspection';
import { formatCalendarDate } from '../../src/lib/vocabulary';
import {
  createPrng,
  sampleDocuments,
  sampleGate,
  type SampleDocuments,
  type SampleGate,
} from '../support/archive-samples';
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
import {
  addClient,
  addGate,
  addSite,
  expectJson,
  fileAssessment,
  publishedVersion,
  serverStorage,
  type PublishedVersion,
} from './support/archive';

/** The plan as the shipped 2026.2 file states it (read, not copied, so a changed file changes the test). */
const planFile = JSON.parse(
  readFileSync(path.join(process.cwd(), 'rulesets/north-american-gate/2026.2.json'), 'utf8'),
) as {
  reinspection: {
    clearAfterDays: Record<string, number>;
    remedyAfterDays: Record<string, number>;
    withdraw: string;
  };
};
// common practice, no source: a home (usage class 1) clear yearly, to remedy within three months.
const CLEAR_CLASS_1_DAYS = planFile.reinspection.clearAfterDays['1']!;
const REMEDY_CLASS_1_DAYS = planFile.reinspection.remedyAfterDays['1']!;
/** Deliberately not 12: twelve months and 365 days agree on most spans, seven months never does. */
const ORG_MONTHS = 7;

let org: FixtureOrganisation;
let office: TestClient;
const gates: Record<string, string> = {};
const visits: Record<string, string> = {};
const clientEmail = `plan.${Date.now()}@saltmere-lodge.test`;

const dayMs = 86_400_000;
const todayUtc = () => {
  const d = new Date();
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), 12);
};
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const addDays = (day: string, days: number) => isoDay(Date.parse(`${day}T12:00:00Z`) + days * dayMs);
/** The 15th of the month `months` from now at noon UTC (no month-end clamping either way). */
const fifteenth = (months: number) => {
  const d = new Date();
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + months, 15, 12);
};
const addMonths = (day: string, months: number) => {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  return isoDay(Date.UTC(y, m - 1 + months, d, 12));
};

/** Sample documents that the real engine scores to `verdict` for this gate (seeded search). */
function documentsScoring(
  verdict: 'clear' | 'remedy' | 'withdraw',
  version: PublishedVersion,
  gate: SampleGate,
  usageClass: number,
): SampleDocuments {
  const diligences =
    verdict === 'clear' ? [1, 0.99, 0.97] : verdict === 'remedy' ? [0.97, 0.93, 0.9, 0.85] : [0.6, 0.4, 0.2];
  for (let seed = 1; seed < 400; seed++) {
    for (const diligence of diligences) {
      const documents = sampleDocuments(
        createPrng(seed * 31 + Math.round(diligence * 100)),
        version.loaded.version,
        diligence,
      );
      const built = buildEngineInput({ ...gate, usageClass } as never, documents as never);
      if (built.ok && scoreParsed(built.value, version.loaded).verdict === verdict) return documents;
    }
  }
  throw new Error(`no sample documents score ${verdict}`);
}

beforeAll(async () => {
  org = await createOrganisation('reinspection-plan');
  await testDb()('organisations')
    .where({ id: org.id })
    .update({ remind_clients: true, reinspection_months: ORG_MONTHS });
  office = await signIn(org.office.email, fixturePassword);
  const current = await publishedVersion('north-american-gate', '2026.2');
  const older = await publishedVersion('north-american-gate', '2026.1');
  expect(current.loaded.version.reinspection).toBeDefined();
  expect(older.loaded.version.reinspection).toBeUndefined();
  const prng = createPrng(9090);
  const client = await addClient(org.id, 'Saltmere Lodge', clientEmail);
  const site = await addSite(org.id, client, '9 Lantern Row', 'Saltmere', 1);
  const file = async (
    name: string,
    version: PublishedVersion,
    verdict: 'clear' | 'remedy' | 'withdraw',
    visitMs: number,
    fields: Record<string, unknown> = {},
  ) => {
    const gate = sampleGate(prng);
    gates[name] = await addGate(org.id, site, `${name} gate`, gate, fields);
    visits[name] = isoDay(visitMs);
    const documents = documentsScoring(verdict, version, gate, 1);
    const filed = await fileAssessment({
      organisationId: org.id,
      gateId: gates[name]!,
      auditorId: org.auditor.id,
      version,
      gate,
      usageClass: 1,
      visitedOn: new Date(visitMs).toISOString(),
      documents,
    });
    expect(filed.verdict).toBe(verdict);
  };
  // Due in 25 days by the plan (overdue for months by the organisation's 7 months).
  await file('Clear', current, 'clear', todayUtc() - (CLEAR_CLASS_1_DAYS - 25) * dayMs);
  // Overdue by 10 days by the plan.
  await file('Remedy', current, 'remedy', todayUtc() - (REMEDY_CLASS_1_DAYS + 10) * dayMs);
  // Withdrawn long ago: no date, whatever its age.
  await file('Withdrawn', current, 'withdraw', todayUtc() - 400 * dayMs);
  // Scored under a version without a plan: the organisation's months, due on this month's 15th.
  await file('Older', older, 'clear', fifteenth(-ORG_MONTHS));
  // Withdrawn, then the office booked the re-visit on the gate: that date wins.
  await file('Booked', current, 'withdraw', todayUtc() - 40 * dayMs, {
    next_inspection_due: isoDay(todayUtc() + 20 * dayMs),
  });
});

describe('re-inspection from the result plan', () => {
  it('dates a clear class I gate visit + the clear days, a remedy gate visit + the remedy days, and keeps the months for older results', async () => {
    const { gates: due } = await expectJson<{ gates: DueGate[] }>(
      await office.fetch('/api/archive/reinspection?within=730'),
    );
    const byId = new Map(due.map((g) => [g.gateId, g]));
    expect(byId.get(gates.Clear!)).toMatchObject({
      source: 'result',
      resultAfterDays: CLEAR_CLASS_1_DAYS,
      dueOn: addDays(visits.Clear!, CLEAR_CLASS_1_DAYS),
      daysLeft: 25,
      state: 'due',
    });
    expect(byId.get(gates.Remedy!)).toMatchObject({
      source: 'result',
      resultAfterDays: REMEDY_CLASS_1_DAYS,
      dueOn: addDays(visits.Remedy!, REMEDY_CLASS_1_DAYS),
      daysLeft: -10,
      state: 'overdue',
    });
    expect(byId.get(gates.Older!)).toMatchObject({
      source: 'interval',
      resultAfterDays: null,
      dueOn: addMonths(visits.Older!, ORG_MONTHS),
      lastVerdict: 'clear',
    });
    expect(byId.get(gates.Booked!)).toMatchObject({
      source: 'set',
      dueOn: isoDay(todayUtc() + 20 * dayMs),
      daysLeft: 20,
      state: 'due',
      lastVerdict: 'withdraw',
    });
  });

  it('lists a withdrawn gate as awaiting fixes, with no date, first and in any window', async () => {
    for (const within of [0, 30, 730]) {
      const { gates: due } = await expectJson<{ gates: DueGate[] }>(
        await office.fetch(`/api/archive/reinspection?within=${within}`),
      );
      expect(due[0]).toMatchObject({
        gateId: gates.Withdrawn,
        state: 'awaiting_fixes',
        source: 'result',
        dueOn: null,
        daysLeft: null,
        lastVerdict: 'withdraw',
        lastSignedVisit: visits.Withdrawn,
      });
    }
    const { gates: none } = await expectJson<{ gates: DueGate[] }>(
      await office.fetch('/api/archive/reinspection?within=0'),
    );
    expect(none.map((g) => g.gateId)).not.toContain(gates.Clear);

    const page = await (await office.fetch('/archive/reinspection')).text();
    expect(page).toContain('Withdrawn gate');
    expect(page).toContain('Awaiting fixes · re-visit when the fixes are reported');
    expect(page).not.toContain(`/api/archive/gates/${gates.Withdrawn}/reinspection.ics`);
    const gatePage = await (await office.fetch(`/archive/gates/${gates.Withdrawn}`)).text();
    expect(gatePage).toContain('Awaiting fixes');
    expect(gatePage).not.toContain(`/api/archive/gates/${gates.Withdrawn}/reinspection.ics`);
    const clearPage = await (await office.fetch(`/archive/gates/${gates.Clear}`)).text();
    expect(clearPage).toContain(
      `${CLEAR_CLASS_1_DAYS} days after the last signed visit (${formatCalendarDate(visits.Clear)})`,
    );
  });

  it('gives no calendar file for a gate awaiting fixes and the plan date for the others', async () => {
    const refused = await office.fetch(`/api/archive/gates/${gates.Withdrawn}/reinspection.ics`);
    expect(refused.status).toBe(409);
    expect(refused.headers.get('content-type')).toContain('application/problem+json');
    expect(((await refused.json()) as { detail: string }).detail).toContain(
      're-visit when the fixes are reported',
    );
    const ics = await (await office.fetch(`/api/archive/gates/${gates.Remedy}/reinspection.ics`)).text();
    expect(ics).toContain(
      `DTSTART;VALUE=DATE:${addDays(visits.Remedy!, REMEDY_CLASS_1_DAYS).replaceAll('-', '')}\r\n`,
    );
  });

  it('reminds the office and the client of a gate awaiting fixes in words, once, with no calendar entry for it', async () => {
    const [seenOffice, seenClient] = await Promise.all([
      caughtMailIds(org.office.email),
      caughtMailIds(clientEmail),
    ]);
    const first = await expectJson<{ officeGates: number; clientMessages: number; alreadyReminded: number }>(
      await office.fetch('/api/archive/reinspection/reminders', { method: 'POST' }),
      202,
    );
    // Withdrawn, Remedy (overdue), Clear (25 days), Older (this month's 15th), Booked (20 days).
    expect(first).toMatchObject({ officeGates: 5, clientMessages: 1, alreadyReminded: 0 });
    const officeRow = await testDb()('outbox_messages')
      .where({ organisation_id: org.id, kind: 'reinspection_reminder' })
      .first('attachments');
    const calendar = (await serverStorage().get(officeRow.attachments[0].storageKey))!.toString('utf8');
    expect(calendar).toContain(`UID:reinspection-${gates.Clear}-`);
    expect(calendar).toContain(`UID:reinspection-${gates.Booked}-`);
    expect(calendar).not.toContain(gates.Withdrawn!);
    expect(calendar.match(/BEGIN:VEVENT/g)).toHaveLength(4);

    const mail = await waitForMail(org.office.email, seenOffice, 15_000);
    expect(mail.text).toContain(
      `Withdrawn gate, 9 Lantern Row, Saltmere (Saltmere Lodge): withdrawn from service on ${formatCalendarDate(visits.Withdrawn)}, re-visit when the fixes are reported`,
    );
    const clientMail = await waitForMail(clientEmail, seenClient, 15_000);
    expect(clientMail.text).toContain(
      'Withdrawn gate, 9 Lantern Row, Saltmere: re-visit when the fixes are reported',
    );

    const second = await expectJson(
      await office.fetch('/api/archive/reinspection/reminders', { method: 'POST' }),
      202,
    );
    expect(second).toEqual({ officeGates: 0, clientMessages: 0, alreadyReminded: 5 });
    const keyed = await testDb()('reinspection_reminders')
      .where({ gate_id: gates.Withdrawn, recipient: 'office' })
      .select(testDb().raw('due_on::text as due_on'));
    expect(keyed).toEqual([{ due_on: visits.Withdrawn }]);
  });
});
