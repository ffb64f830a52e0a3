/**
 * Data for the signing, outbox and report tests, written straight to the database (the
 * behaviour under test is then exercised over HTTP): an organisation-local ruleset version,
 * a site and swing gate of the fixture client, and a scored assessment whose stored result is
 * shaped like the engine's, with photos in the server's file storage and one force trace.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { hashPassword } from '../../../src/lib/server/passwords';
import { storageFromEnv } from '../../../src/lib/server/storage';
import { samplePhoto, sampleResult } from '../../support/sample-report';

export interface SeededAssessment {
  assessmentId: string;
  gateId: string;
  siteId: string;
  rulesetVersionId: string;
  resultSha256: string;
  result: ReturnType<typeof sampleResult>;
}

const areas = [
  { key: 'pinch', title: 'Pinch and crush points' },
  { key: 'gaps', title: 'Gaps and openings' },
  { key: 'signage', title: 'Signs' },
  { key: 'force', title: 'Force and reversal' },
  { key: 'sensing', title: 'Entrapment sensing' },
  { key: 'controls', title: 'Controls' },
  { key: 'build', title: 'Gate construction' },
  { key: 'power', title: 'Power and wiring' },
];

async function rulesetVersion(knex: Knex, organisationId: string): Promise<string> {
  const family = `fixture-family-${randomBytes(3).toString('hex')}`;
  const [ruleset] = await knex('rulesets')
    .insert({ organisation_id: organisationId, family, title: 'Fixture residential gate checks' })
    .returning('id');
  const content = { family, version: '2026.1', areas };
  const [version] = await knex('ruleset_versions')
    .insert({
      ruleset_id: ruleset.id,
      version: '2026.1',
      content: JSON.stringify(content),
      content_sha256: createHash('sha256').update(JSON.stringify(content)).digest('hex'),
      status: 'published',
      published_at: knex.fn.now(),
    })
    .returning('id');
  return version.id;
}

/** A scored assessment of a new swing gate at a new site of `clientId`. */
export async function seedScoredAssessment(
  knex: Knex,
  org: { id: string; auditorId: string; clientId: string },
  options: { dataDir: string; photos?: number; findings?: number },
): Promise<SeededAssessment> {
  const rulesetVersionId = await rulesetVersion(knex, org.id);
  const [site] = await knex('sites')
    .insert({
      organisation_id: org.id,
      client_id: org.clientId,
      name: 'Home',
      address_line1: '27 Fernhollow Way',
      city: 'Marrowfield',
      region: 'CO',
      postal_code: '80999',
      usage_class: 1,
    })
    .returning('id');
  const [gate] = await knex('gates')
    .insert({
      organisation_id: org.id,
      site_id: site.id,
      label: 'Driveway gate',
      kind: 'swing',
      leaves: 'double',
      opening_direction: 'pull_to_open',
      width_mm: 3660,
      height_mm: 1520,
      weight_kg: 140,
    })
    .returning('id');
  const result = sampleResult(options.findings ?? 9);
  const resultSha256 = createHash('sha256').update(JSON.stringify(result)).digest('hex');
  const [assessment] = await knex('assessments')
    .insert({
      organisation_id: org.id,
      gate_id: gate.id,
      ruleset_version_id: rulesetVersionId,
      auditor_id: org.auditorId,
      status: 'scored',
      purpose: 'inspection',
      answers: JSON.stringify({ signsPosted: { value: 'no' } }),
      observations: JSON.stringify({
        swingGeometry: {
          aMm: 150,
          bMm: 180,
          bracketFromHingeMm: 900,
          retractedLengthMm: 760,
          strokeMm: 300,
          targetOpeningDeg: 90,
        },
      }),
      result: JSON.stringify(result),
      result_sha256: resultSha256,
      verdict: result.verdict,
      visited_on: new Date('2026-11-20T15:00:00Z'),
      submitted_at: new Date('2026-11-20T17:00:00Z'),
    })
    .returning('id');
  const files = storageFromEnv({ STORAGE_DRIVER: 'disk', LATCHWELL_DATA_DIR: options.dataDir });
  const failing = result.findings.filter((f) => f.outcome === 'fail');
  for (let i = 0; i < (options.photos ?? 2); i++) {
    const jpeg = await samplePhoto(i, 640, 480);
    const { key } = await files.put(jpeg, 'image/jpeg');
    await knex('assessment_photos').insert({
      organisation_id: org.id,
      assessment_id: assessment.id,
      item_key: failing[i % failing.length].ruleId,
      caption: `Gate photo ${i + 1}`,
      original_sha256: key,
      original_content_type: 'image/jpeg',
      original_bytes: jpeg.length,
      display_sha256: key,
      display_content_type: 'image/jpeg',
      display_bytes: jpeg.length,
      width: 640,
      height: 480,
      taken_at: new Date('2026-11-20T15:10:00Z'),
    });
  }
  const samples = Array.from({ length: 200 }, (_, i) => [
    i * 0.005,
    i < 40 ? 0 : Math.max(20, 480 - Math.abs(i - 90) * 9),
  ]);
  await knex('force_traces').insert({
    organisation_id: org.id,
    assessment_id: assessment.id,
    item_key: 'closingEdge300',
    label: 'Closing edge, 300 mm gap',
    samples: JSON.stringify(samples),
    evaluation: JSON.stringify({ peak: 480, limits: { peakN: 400 }, overallPass: false }),
  });
  return {
    assessmentId: assessment.id,
    gateId: gate.id,
    siteId: site.id,
    rulesetVersionId,
    resultSha256,
    result,
  };
}

export interface MinimalOrganisation {
  id: string;
  clientId: string;
  clientEmail: string;
  office: { id: string; email: string };
  auditor: { id: string; email: string };
  password: string;
}

/** An organisation with an office person, an auditor and a client, for a database of its own. */
export async function seedOrganisation(knex: Knex, label: string): Promise<MinimalOrganisation> {
  const tag = `${label}-${randomBytes(4).toString('hex')}`;
  const password = 'outbox-fixture-pass-2026';
  const hash = await hashPassword(password);
  const [org] = await knex('organisations')
    .insert({ name: `Outbox Gates ${tag}`, slug: tag, display_units: 'metric' })
    .returning('id');
  const clientEmail = `client.${tag}@fixtures.test`;
  const [client] = await knex('clients')
    .insert({
      organisation_id: org.id,
      name: `Household ${tag}`,
      kind: 'homeowner',
      contact_email: clientEmail,
    })
    .returning('id');
  const [office] = await knex('users')
    .insert({
      organisation_id: org.id,
      email: `office.${tag}@fixtures.test`,
      name: `Office ${tag}`,
      role: 'office',
      password_hash: hash,
    })
    .returning(['id', 'email']);
  const [auditor] = await knex('users')
    .insert({
      organisation_id: org.id,
      email: `auditor.${tag}@fixtures.test`,
      name: `Auditor ${tag}`,
      role: 'auditor',
      password_hash: hash,
    })
    .returning(['id', 'email']);
  return { id: org.id, clientId: client.id, clientEmail, office, auditor, password };
}
