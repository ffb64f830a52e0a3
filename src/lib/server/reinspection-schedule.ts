/**
 * Re-inspection reminders on a schedule, without anyone pressing a button.
 *
 * pg-boss's scheduler puts a `reinspection-sweep` job on the queue every hour (REINSPECTION_SWEEP_CRON,
 * cron in UTC; pg-boss lets one instance at a time fire a schedule), and every instance puts one
 * when it starts (at most one a minute). The sweep queues one `reinspection-reminders` job per
 * organisation whose local time is past REINSPECTION_REMINDER_HOUR (default 7) and that has not
 * had its run for its local today. That job claims (organisation, local day) in
 * `reinspection_reminder_runs` (primary key: a second claim finds the row and does nothing) and
 * queues the reminders exactly as the button does (reinspection-reminders.ts), so an
 * organisation gets one run per day whatever the number of instances, and each gate and due
 * date is reminded once (that module's own claim).
 */
import type { Knex } from 'knex';
import { db } from './db';
import { onJobsStarted, queueName, sendJob } from './jobs/boss';
import { getOrganisation } from './organisations';
import { queueReinspectionReminders } from './reinspection-reminders';

const reminderHour = () => {
  const hour = Number(process.env.REINSPECTION_REMINDER_HOUR ?? 7);
  return Number.isInteger(hour) && hour >= 0 && hour <= 23 ? hour : 7;
};

/** Organisations past their reminder hour with no run for their local today. */
export async function organisationsDueToday(knex: Knex = db()): Promise<{ id: string; day: string }[]> {
  const { rows } = await knex.raw<{ rows: { id: string; day: string }[] }>(
    `select o.id, (now() at time zone o.time_zone)::date::text as day
       from organisations o
      where extract(hour from now() at time zone o.time_zone) >= ?
        and not exists (select 1 from reinspection_reminder_runs r
                         where r.organisation_id = o.id and r.run_on = (now() at time zone o.time_zone)::date)`,
    [reminderHour()],
  );
  return rows;
}

/** The sweep: one reminders job per organisation due its run today. */
export async function sweepReminders(knex: Knex = db()): Promise<number> {
  const due = await organisationsDueToday(knex);
  for (const { id, day } of due)
    // One job per organisation and day while it waits (a later sweep finds the first still queued).
    await sendJob(
      'reinspection-reminders',
      { organisationId: id, day },
      { singletonKey: `${id}:${day}`, singletonSeconds: 3600 },
    );
  return due.length;
}

/** One organisation's run for local day `day`: claimed once, then the reminders are queued. */
export async function runOrganisationReminders(
  organisationId: string,
  day: string,
  knex: Knex = db(),
): Promise<'ran' | 'already_ran' | 'gone'> {
  const organisation = await getOrganisation(organisationId);
  if (!organisation) return 'gone';
  const claimed = await knex('reinspection_reminder_runs')
    .insert({ organisation_id: organisationId, run_on: day })
    .onConflict(['organisation_id', 'run_on'])
    .ignore()
    .returning('run_on');
  if (!claimed.length) return 'already_ran';
  try {
    await queueReinspectionReminders(organisation, { userId: null, label: 'scheduled reminders', ip: null });
  } catch (error) {
    // Let the job's retry run it again.
    await knex('reinspection_reminder_runs').where({ organisation_id: organisationId, run_on: day }).delete();
    throw error;
  }
  return 'ran';
}

onJobsStarted(async (boss) => {
  if (process.env.REINSPECTION_SCHEDULE === 'off') return;
  const sweep = queueName('reinspection-sweep');
  await boss.schedule(sweep, process.env.REINSPECTION_SWEEP_CRON || '0 * * * *', { organisationId: null });
  await boss.work(sweep, { pollingIntervalSeconds: 5 }, async () => {
    await sweepReminders();
  });
  await boss.work<{ organisationId: string; day: string }>(
    queueName('reinspection-reminders'),
    { pollingIntervalSeconds: 2, batchSize: 1 },
    async ([job]) => {
      if (job) await runOrganisationReminders(job.data.organisationId, job.data.day);
    },
  );
  // A server that starts after the hour need not wait for the next one.
  await sendJob(
    'reinspection-sweep',
    { organisationId: null },
    { singletonKey: 'start', singletonSeconds: 60 },
  );
});
