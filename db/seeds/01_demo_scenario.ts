/**
 * Seeds the invented demo scenario into an empty database (`npm start` runs it only when no
 * organisation exists; `npm run db:seed` likewise). Idempotent by design: it does nothing
 * when the demo organisation is already there.
 */
import type { Knex } from 'knex';
import { hashPassword } from '../../src/lib/server/passwords';
import { demoHomeownerEmail, demoOrganisation, demoPassword, demoStaff } from './demo/people';

export async function seed(knex: Knex): Promise<void> {
  const existing = await knex('organisations').where({ slug: demoOrganisation.slug }).first();
  if (existing) return;
  await knex.transaction(async (trx) => {
    const [org] = await trx('organisations').insert(demoOrganisation).returning('id');
    const passwordHash = await hashPassword(demoPassword);
    await trx('users').insert(
      demoStaff.map((s) => ({ ...s, organisation_id: org.id, password_hash: passwordHash })),
    );
    const [client] = await trx('clients')
      .insert({ organisation_id: org.id, name: 'Wren & Alder Household', kind: 'homeowner', contact_email: demoHomeownerEmail, phone: '+1 555 0100' })
      .returning('id');
    await trx('users').insert({ organisation_id: org.id, email: demoHomeownerEmail, name: 'Imogen Wren', role: 'homeowner', client_id: client.id });
    const [site] = await trx('sites')
      .insert({ organisation_id: org.id, client_id: client.id, name: 'Home', address_line1: '14 Thistlecombe Lane', city: 'Marrowfield', region: 'CO', postal_code: '80999', country: 'US', usage_class: 1 })
      .returning('id');
    await trx('gates').insert({
      organisation_id: org.id, site_id: site.id, label: 'Driveway gate', kind: 'swing', leaves: 'double',
      opening_direction: 'pull_to_open', width_mm: 3660, height_mm: 1520, weight_kg: 140,
      operator: { listed: true, manufacturedOn: '2019-05-01', mounting: 'post', power: 'low_voltage_dc' },
      installed_on: '2019-06-20',
    });
  });
}
