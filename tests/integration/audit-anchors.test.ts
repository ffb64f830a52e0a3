/**
 * The audit trail anchored outside its table. A signed report carries the chain head when it
 * was signed (PDF keywords and signing record) and an export carries it as
 * `audit-trail-head.json`. Removing the newest events leaves a chain that still links up, so
 * only the anchors can tell: the owner's verification (from the stored anchors, or from a head
 * supplied out of an export) and the public check of the signed PDF must both say the trail
 * ends before an event a signed document or export recorded.
 *
 * The removal is done the way an attacker with more than the app's powers would: through the
 * owner role's connection, the trigger switched off. The whole database shares one chain, so
 * while the newest events are gone this file holds the chain's append lock (other files'
 * audited requests wait) and puts every row back before letting go.
 */
import { createHash } from 'node:crypto';
import pg from 'pg';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { anchorOfPdf, TRUNCATED_MESSAGE, type AuditAnchor } from '../../src/lib/server/audit-anchors';
import type { TrailVerification } from '../../src/lib/server/audit-trail';
import type { VerificationAnswer } from '../../src/lib/server/document-verification';
import { extractPdfText } from '../support/pdf-text';
import { expectJson, readZip, serverStorage } from './support/archive';
import {
  anonymousClient,
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { seedScoredAssessment } from './support/signing-seed';

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

let org: FixtureOrganisation;
let owner: TestClient;
let office: TestClient;
let signedPdf: Buffer;
let signedAnchor: AuditAnchor;
let exportAnchor: AuditAnchor;

/** Sends a seeded assessment for signature and signs it with a typed name, as the homeowner would. */
async function signOne(): Promise<{ id: string; sha256: string }> {
  const seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 0 },
  );
  const clientEmail = (await testDb()('clients').where({ id: org.clientId }).first('contact_email'))
    .contact_email as string;
  const seen = await caughtMailIds(clientEmail);
  const sent = await office.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {});
  expect(sent.status, await sent.clone().text()).toBe(202);
  const mail = await waitForMail(clientEmail, seen, 20_000);
  const token = /\/sign\/([A-Za-z0-9_-]{43})/.exec(mail.text)![1]!;
  const shown = new Uint8Array(
    await (await anonymousClient().fetch(`/api/sign/${token}/report.pdf`)).arrayBuffer(),
  );
  const res = await anonymousClient().json('POST', `/api/sign/${token}/submit`, {
    name: 'Orla Wetherby',
    consent: true,
    intent: true,
    shownPdfSha256: sha256(shown),
    signature: { method: 'typed' },
    acknowledgedCautions: seeded.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId),
  });
  const body = await expectJson<{ document: { id: string; sha256: string } }>(res, 201);
  return body.document;
}

beforeAll(async () => {
  org = await createOrganisation('anchors');
  [owner, office] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
  ]);
  const document = await signOne();
  signedPdf = (await serverStorage().get(document.sha256))!;
  signedAnchor = (await anchorOfPdf(signedPdf))!;
  const zip = readZip(Buffer.from(await (await office.fetch('/api/archive/export')).arrayBuffer()));
  const head = JSON.parse(zip.get('audit-trail-head.json')!.toString('utf8')) as {
    eventId: number;
    hash: string;
    anchor: string;
  };
  exportAnchor = { eventId: head.eventId, hash: head.hash };
  expect(head.anchor).toBe(`${head.eventId}:${head.hash}`);
}, 60_000);

/** Posts the PDF to the public check, as anyone holding it could. */
async function publicCheck(pdf: Buffer): Promise<VerificationAnswer> {
  const form = new FormData();
  form.set('file', new Blob([new Uint8Array(pdf)], { type: 'application/pdf' }), 'report.pdf');
  return expectJson<VerificationAnswer>(
    await anonymousClient().fetch('/api/verify', { method: 'POST', body: form }),
  );
}

describe('chain heads carried by signed reports and exports', () => {
  it('puts the head at signing into the signed PDF (keywords and signing record) and records it as an anchor', async () => {
    expect(signedAnchor).toBeTruthy();
    const event = await testDb()('audit_events').where({ id: signedAnchor.eventId }).first('hash');
    expect(event.hash).toBe(signedAnchor.hash);
    const text = await extractPdfText(signedPdf);
    expect(text).toContain('Audit trail at signing');
    expect(text).toContain(`event #${signedAnchor.eventId}`);
    const stored = await testDb()('audit_anchors')
      .where({ organisation_id: org.id, kind: 'signed_report' })
      .first('event_id', 'event_hash');
    expect({ eventId: Number(stored.event_id), hash: stored.event_hash }).toEqual(signedAnchor);
  });

  it("puts the export's own archive.exported event into the ZIP as the head", async () => {
    const event = await testDb()('audit_events')
      .where({ id: exportAnchor.eventId })
      .first('action', 'organisation_id', 'hash');
    expect(event).toMatchObject({
      action: 'archive.exported',
      organisation_id: org.id,
      hash: exportAnchor.hash,
    });
    expect(exportAnchor.eventId).toBeGreaterThan(signedAnchor.eventId);
  });

  it('verifies with every head present, and refuses a head that is not one', async () => {
    const intact = await expectJson<TrailVerification>(
      await owner.fetch(`/api/archive/audit/verify?anchor=${exportAnchor.eventId}:${exportAnchor.hash}`),
    );
    expect(intact.truncated).toBeNull();
    expect(intact.anchorsChecked).toBeGreaterThanOrEqual(3);
    const answer = await publicCheck(signedPdf);
    expect(answer).toMatchObject({
      match: true,
      auditTrail: { eventId: signedAnchor.eventId, state: 'present' },
    });
    expect((await owner.fetch('/api/archive/audit/verify?anchor=12:abc')).status).toBe(400);
  });

  it('reports a trail whose newest events were removed (and the stored anchors with them) as ending before an anchored event', async () => {
    const admin = new pg.Client({ connectionString: inject('migrationDatabaseUrl') });
    await admin.connect();
    try {
      // Hold the lock every append takes, so nothing joins the chain while its end is missing.
      await admin.query(`select pg_advisory_lock(hashtext('audit_events'))`);
      const events = (
        await admin.query('select * from audit_events where id >= $1 order by id', [signedAnchor.eventId])
      ).rows;
      const anchors = (
        await admin.query('select * from audit_anchors where event_id >= $1 order by id', [
          signedAnchor.eventId,
        ])
      ).rows;
      const lastKept = Number(
        (await admin.query('select max(id) as id from audit_events where id < $1', [signedAnchor.eventId]))
          .rows[0].id,
      );
      expect(events.length).toBeGreaterThanOrEqual(2);
      const putBack = async () => {
        await admin.query('begin');
        await admin.query('alter table audit_events disable trigger audit_events_append_only');
        await admin.query('alter table audit_anchors disable trigger audit_anchors_append_only');
        for (const e of events) {
          await admin.query(
            'insert into audit_events (id, organisation_id, actor_user_id, actor_label, action, entity_type, entity_id, ip, detail, created_at, prev_hash, hash) values ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11,$12) on conflict (id) do nothing',
            [
              e.id,
              e.organisation_id,
              e.actor_user_id,
              e.actor_label,
              e.action,
              e.entity_type,
              e.entity_id,
              e.ip,
              JSON.stringify(e.detail),
              e.created_at,
              e.prev_hash,
              e.hash,
            ],
          );
        }
        for (const a of anchors) {
          await admin.query(
            'insert into audit_anchors (id, organisation_id, kind, reference, event_id, event_hash, created_at) values ($1,$2,$3,$4,$5,$6,$7) on conflict (id) do nothing',
            [a.id, a.organisation_id, a.kind, a.reference, a.event_id, a.event_hash, a.created_at],
          );
        }
        await admin.query('alter table audit_anchors enable trigger audit_anchors_append_only');
        await admin.query('alter table audit_events enable trigger audit_events_append_only');
        await admin.query('commit');
      };
      try {
        // Cut the trail's end: the events from the signed report's head on.
        await admin.query('begin');
        await admin.query('alter table audit_events disable trigger audit_events_append_only');
        await admin.query('delete from audit_events where id >= $1', [signedAnchor.eventId]);
        await admin.query('alter table audit_events enable trigger audit_events_append_only');
        await admin.query('commit');

        // What is left still links up; the stored anchors give it away.
        const cut = await expectJson<TrailVerification>(await owner.fetch('/api/archive/audit/verify'));
        expect(cut.firstBrokenId).toBeNull();
        expect(cut).toMatchObject({
          ok: false,
          truncated: { lastEventId: lastKept, message: TRUNCATED_MESSAGE },
        });
        expect(cut.truncated!.anchoredEventId).toBeGreaterThanOrEqual(exportAnchor.eventId);
        const page = await (await owner.fetch('/archive/audit?verify=1')).text();
        expect(page).toContain(TRUNCATED_MESSAGE);

        // Remove the stored anchors too: now only the copies outside the database can tell.
        await admin.query('begin');
        await admin.query('alter table audit_anchors disable trigger audit_anchors_append_only');
        await admin.query('delete from audit_anchors where event_id >= $1', [signedAnchor.eventId]);
        await admin.query('alter table audit_anchors enable trigger audit_anchors_append_only');
        await admin.query('commit');
        const withoutStored = await expectJson<TrailVerification>(
          await owner.fetch('/api/archive/audit/verify'),
        );
        expect(withoutStored.truncated).toBeNull(); // the database alone no longer shows it
        const fromExport = await expectJson<TrailVerification>(
          await owner.fetch(`/api/archive/audit/verify?anchor=${exportAnchor.eventId}:${exportAnchor.hash}`),
        );
        expect(fromExport).toMatchObject({
          ok: false,
          truncated: {
            anchoredEventId: exportAnchor.eventId,
            lastEventId: lastKept,
            message: TRUNCATED_MESSAGE,
          },
        });
        const answer = await publicCheck(signedPdf);
        expect(answer).toMatchObject({
          match: true,
          auditTrail: { eventId: signedAnchor.eventId, state: 'truncated', message: TRUNCATED_MESSAGE },
        });
        const typed = new FormData();
        typed.set('document', sha256(signedPdf));
        const verifyPage = await (
          await anonymousClient().fetch('/verify', { method: 'POST', body: typed })
        ).text();
        expect(verifyPage).toContain('data-audit-trail="truncated"');
      } finally {
        await admin.query('rollback').catch(() => {});
        await putBack();
      }
    } finally {
      await admin.query(`select pg_advisory_unlock(hashtext('audit_events'))`).catch(() => {});
      await admin.end();
    }
    const restored = await expectJson<TrailVerification>(
      await owner.fetch(`/api/archive/audit/verify?anchor=${exportAnchor.eventId}:${exportAnchor.hash}`),
    );
    expect(restored.truncated).toBeNull();
    expect(restored.anchorsBroken).toBe(0);
  });
});
