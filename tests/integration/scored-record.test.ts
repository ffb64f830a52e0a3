/**
 * The scored record: what was judged at submit stays what every report, the signing copy, the
 * signing page and the signed PDF show, whatever happens to the gate, its site and the client
 * afterwards; the next draft of the gate sees the new values; the database refuses any change
 * to the record once it exists.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { loadReportSource } from '@/lib/server/reports';
import { extractPdfText } from '../support/pdf-text';
import {
  anonymousClient,
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  linkIn,
  signIn,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { insertClient, insertGate, insertSite } from './support/domain';
import { saveNewDraft } from './support/draft-over-http';

const family = 'north-american-gate';

let org: FixtureOrganisation;
let owner: TestClient;
let clientId: string;
let siteId: string;
let otherSiteId: string;
let gateId: string;
let assessmentId: string;
let contactEmail: string;
let label: string;

beforeAll(async () => {
  org = await createOrganisation('record');
  owner = await signIn(org.owner.email, fixturePassword);
  contactEmail = `frozen.${Date.now()}@owners.test`;
  clientId = await insertClient(org.id, { name: 'Quillwater Holdings', contact_email: contactEmail });
  siteId = await insertSite(org.id, clientId, {
    address_line1: '14 Larchmere Close',
    city: 'Oldbridge',
    usage_class: 2,
  });
  otherSiteId = await insertSite(org.id, clientId, {
    address_line1: '99 Farrowgate Lane',
    city: 'Newcombe',
    usage_class: 4,
  });
  label = `Courtyard gate ${Date.now().toString(36)}`;
  gateId = await insertGate(org.id, siteId, { label, width_mm: 3660 });

  const { id, saved } = await saveNewDraft(
    owner,
    { gateId, family },
    {
      answers: { placardsLegible: { value: 'no' } },
      observations: {
        site: {
          pedestriansUseDriveway: true,
          childrenOrPetsPresent: true,
          publicAccess: false,
          slopeAcrossSwing: false,
        },
      },
    },
  );
  assessmentId = id;
  expect(saved.status, await saved.clone().text()).toBe(200);
  const submitted = await owner.json('POST', `/api/assessments/${assessmentId}/submit`);
  expect(submitted.status, await submitted.clone().text()).toBe(200);
});

async function previewText(): Promise<string> {
  const res = await owner.fetch(`/api/assessments/${assessmentId}/report.pdf`);
  expect(res.status).toBe(200);
  return extractPdfText(new Uint8Array(await res.arrayBuffer()));
}

/** The report as the renderer would get it, read the way the server reads it. */
async function reportFacts() {
  const source = await loadReportSource(testDb(), org.id, assessmentId, {
    kind: 'preview',
    documentId: 'test',
  });
  if (!source) throw new Error('no report source');
  return { gate: source.gate, site: source.site, client: source.client };
}

describe('a submitted assessment keeps what was judged', () => {
  let before: { text: string; facts: Awaited<ReturnType<typeof reportFacts>> };
  let token: string;
  let signPageBefore: string;

  it('freezes the gate, site, client, documents and result at submit', async () => {
    const row = await testDb()('assessments').where({ id: assessmentId }).first('scored_record', 'result');
    expect(row.scored_record).toMatchObject({
      format: 1,
      source: 'submit',
      gate: { id: gateId, label, widthMm: 3660, siteId },
      site: { id: siteId, addressLine1: '14 Larchmere Close', city: 'Oldbridge', usageClass: 2 },
      client: { id: clientId, name: 'Quillwater Holdings', contactEmail },
      answers: { placardsLegible: { value: 'no' } },
      ruleset: { family },
    });
    expect(row.scored_record.result).toEqual(row.result);
    before = { text: await previewText(), facts: await reportFacts() };
    expect(before.text).toContain('14 Larchmere Close');
    expect(before.text).toContain('Quillwater Holdings');
    expect(before.text).toContain(label);
  });

  it('shows the frozen values in the report after the gate, its site and the client change', async () => {
    const gate = await owner.json('PATCH', `/api/gates/${gateId}`, {
      label: 'Renamed gate',
      widthMm: 4880,
      siteId: otherSiteId,
    });
    expect(gate.status, await gate.clone().text()).toBe(200);
    const site = await owner.json('PATCH', `/api/sites/${siteId}`, {
      addressLine1: '1 Changed Street',
      city: 'Quenbury',
    });
    expect(site.status, await site.clone().text()).toBe(200);
    const client = await owner.json('PATCH', `/api/clients/${clientId}`, {
      name: 'Renamed Holdings',
      contactEmail: `changed.${Date.now()}@owners.test`,
    });
    expect(client.status, await client.clone().text()).toBe(200);

    expect(await reportFacts()).toEqual(before.facts);
    const after = await previewText();
    for (const gone of ['Renamed gate', '1 Changed Street', 'Quenbury', 'Renamed Holdings', 'Farrowgate'])
      expect(after).not.toContain(gone);
    // The same document but for the time it was rendered (the last words of the record page).
    const withoutRenderTime = (t: string) => t.replace(/Rendered [^]*$/, '');
    expect(withoutRenderTime(after)).toBe(withoutRenderTime(before.text));
    expect(withoutRenderTime(after).length).toBeGreaterThan(1000);

    const api = await (await owner.json('GET', `/api/assessments/${assessmentId}`)).json();
    expect(api.gate.label).toBe(label);
    expect(api.site).toMatchObject({ id: siteId, addressLine1: '14 Larchmere Close', usageClass: 2 });
    expect(api.client.name).toBe('Quillwater Holdings');
  });

  it('lists the frozen values too', async () => {
    const res = await owner.json('GET', `/api/assessments?gateId=${gateId}&status=scored`);
    expect(res.status).toBe(200);
    const { items } = await res.json();
    expect(items.map((a: { id: string }) => a.id)).toEqual([assessmentId]);
    expect(items[0]).toMatchObject({
      gate: { id: gateId, label, kind: 'swing' },
      site: { id: siteId, addressLine1: '14 Larchmere Close', city: 'Oldbridge', usageClass: 2 },
      client: { id: clientId, name: 'Quillwater Holdings' },
    });
    // A draft of the same gate lists the live values.
    const draft = await owner.json('POST', '/api/assessments', { gateId, family, purpose: 'service' });
    expect(draft.status).toBe(201);
    const draftId = (await draft.json()).id;
    const drafts = await (await owner.json('GET', `/api/assessments?gateId=${gateId}&status=draft`)).json();
    expect(drafts.items).toEqual([
      expect.objectContaining({
        id: draftId,
        gate: expect.objectContaining({ label: 'Renamed gate' }),
        site: expect.objectContaining({ id: otherSiteId, addressLine1: '99 Farrowgate Lane', usageClass: 4 }),
        client: expect.objectContaining({ name: 'Renamed Holdings' }),
      }),
    ]);
    expect((await owner.fetch(`/api/assessments/${draftId}`, { method: 'DELETE' })).status).toBe(204);
  });

  it('sends the link to the frozen contact and the signing page shows the frozen record', async () => {
    const seen = await caughtMailIds(contactEmail);
    const sent = await owner.json('POST', `/api/assessments/${assessmentId}/send-for-signature`, {});
    expect(sent.status, await sent.clone().text()).toBe(202);
    const mail = await waitForMail(contactEmail, seen, 15_000);
    expect(mail.text).toContain(label);
    expect(mail.text).not.toContain('Renamed gate');
    token = new URL(linkIn(mail.text, '/sign/')).pathname.split('/').pop() as string;
    const page = await anonymousClient().fetch(`/sign/${token}`);
    expect(page.status).toBe(200);
    signPageBefore = await page.text();
    expect(signPageBefore).toContain(label);
    expect(signPageBefore).toContain('14 Larchmere Close');
    expect(signPageBefore).not.toContain('Renamed');
    expect(signPageBefore).not.toContain('1 Changed Street');
  });

  it('keeps the signing page the same after further edits of the gate and client', async () => {
    const client = await owner.json('PATCH', `/api/clients/${clientId}`, { name: 'Third Name Holdings' });
    expect(client.status).toBe(200);
    const gate = await owner.json('PATCH', `/api/gates/${gateId}`, { label: 'Third gate name' });
    expect(gate.status).toBe(200);
    const page = await anonymousClient().fetch(`/sign/${token}`);
    const text = await page.text();
    expect(text).not.toContain('Third gate name');
    expect(text).toContain(label);
    expect(text).toContain('14 Larchmere Close');
  });

  it('gives a new draft of the gate the new values', async () => {
    const draft = await owner.json('POST', '/api/assessments', { gateId, family, purpose: 'service' });
    expect(draft.status).toBe(201);
    const body = await draft.json();
    expect(body.gate.label).toBe('Third gate name');
    expect(body.site).toMatchObject({ id: otherSiteId, addressLine1: '99 Farrowgate Lane', usageClass: 4 });
    expect(body.client.name).toBe('Third Name Holdings');
  });
});

describe('the database keeps the record fixed', () => {
  it('refuses a change to the record, and a submitted assessment going back to draft', async () => {
    const knex = testDb();
    await expect(
      knex('assessments')
        .where({ id: assessmentId })
        .update({ scored_record: knex.raw(`jsonb_set(scored_record, '{gate,widthMm}', '4880')`) }),
    ).rejects.toThrow(/frozen scored record/);
    await expect(knex('assessments').where({ id: assessmentId }).update({ status: 'draft' })).rejects.toThrow(
      /cannot go back to draft|scored record cannot change/,
    );
    const row = await knex('assessments').where({ id: assessmentId }).first('scored_record');
    expect(row.scored_record.gate.widthMm).toBe(3660);
  });

  it('keeps the list summary derived from the record, whatever a statement supplies', async () => {
    const knex = testDb();
    const summaryOf = async (id: string) =>
      (await knex('assessments').where({ id }).first('scored_summary')).scored_summary;
    const expected = {
      gateLabel: label,
      gateKind: 'swing',
      siteId,
      siteName: null,
      siteAddressLine1: '14 Larchmere Close',
      siteCity: 'Oldbridge',
      siteUsageClass: 2,
      clientId,
      clientName: 'Quillwater Holdings',
      rulesetTitle: expect.stringMatching(/\S/),
    };
    expect(await summaryOf(assessmentId)).toEqual(expected);
    await knex('assessments')
      .where({ id: assessmentId })
      .update({ scored_summary: JSON.stringify({ ...expected, gateLabel: 'forged' }) });
    expect(await summaryOf(assessmentId)).toEqual(expected);
    // A draft has no record, so no summary either.
    const [{ id: draftId }] = await knex('assessments')
      .insert({
        organisation_id: org.id,
        gate_id: gateId,
        ruleset_version_id: (
          await knex('assessments').where({ id: assessmentId }).first('ruleset_version_id')
        ).ruleset_version_id,
        auditor_id: org.owner.id,
        scored_summary: JSON.stringify({ gateLabel: 'forged' }),
      })
      .returning('id');
    expect(await summaryOf(draftId)).toBeNull();
    await knex('assessments')
      .where({ id: draftId })
      .update({ scored_summary: JSON.stringify({ gateLabel: 'forged' }) });
    expect(await summaryOf(draftId)).toBeNull();
    await knex('assessments').where({ id: draftId }).delete();
  });

  it('builds the record itself when a row leaves draft, ignoring one the statement supplies', async () => {
    const knex = testDb();
    const site = await insertSite(org.id, clientId, { address_line1: '5 Tidewell Row', city: 'Oldbridge' });
    const gate = await insertGate(org.id, site, { label: 'Side gate' });
    const [{ id }] = await knex('assessments')
      .insert({
        organisation_id: org.id,
        gate_id: gate,
        ruleset_version_id: (
          await knex('assessments').where({ id: assessmentId }).first('ruleset_version_id')
        ).ruleset_version_id,
        auditor_id: org.owner.id,
      })
      .returning('id');
    await knex('assessments')
      .where({ id })
      .update({
        status: 'scored',
        result: JSON.stringify({ verdict: 'clear' }),
        result_sha256: 'c'.repeat(64),
        verdict: 'clear',
        scored_record: JSON.stringify({ gate: { label: 'forged' } }),
      });
    const row = await knex('assessments').where({ id }).first('scored_record');
    expect(row.scored_record.gate.label).toBe('Side gate');
    expect(row.scored_record.site.addressLine1).toBe('5 Tidewell Row');
    // …and a result that is not the engine's shape is refused when read: a 500, never a default.
    const res = await owner.fetch(`/api/assessments/${id}/report.pdf`);
    expect(res.status).toBe(500);
    expect(res.headers.get('content-type')).toContain('application/problem+json');
    expect((await res.json()).detail).toMatch(/damaged/);
    const api = await owner.json('GET', `/api/assessments/${id}`);
    expect(api.status).toBe(500);
    const page = await owner.fetch(`/assessments/${id}`);
    expect(page.status).toBe(500);
    expect(await page.text()).toContain('This assessment cannot be shown');
  });
});
