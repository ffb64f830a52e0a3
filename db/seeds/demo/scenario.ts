/**
 * The demo scenario, built through the product's own server modules so every row is what the
 * app itself would have written: clients, sites and gates; visits over the past two years by
 * two auditors; drafts, scored assessments, ones waiting for the owner's signature, signed
 * ones (rendered, digitally signed, mailed through the outbox) and a few corrected revisions.
 * Last year's visits are pinned to the earliest North American version and this autumn's to the
 * one before the newest, so the newest version's impact list has signed gates to re-score: a
 * swing gate withdrawn for a wall near its open leaf, although a monitored edge protects that
 * zone, clears under the newest version.
 *
 * Needs DATABASE_URL (and LATCHWELL_DATA_DIR for files) set for the target database before
 * this module is imported: the server modules read them.
 */
import type { Knex } from 'knex';
import { AssessmentPatchSchema } from '../../../src/lib/api/assessments';
import { ClientCreateSchema } from '../../../src/lib/api/clients';
import { GateCreateSchema, type Gate } from '../../../src/lib/api/gates';
import { SiteCreateSchema } from '../../../src/lib/api/sites';
import { loadRulesetFile, scoreParsed, type RulesetVersion } from '../../../src/lib/rules';
import { buildEngineInput } from '../../../src/lib/server/assessment-input';
import { submitAssessment } from '../../../src/lib/server/assessments';
import { createAssessment, patchAssessment } from '../../../src/lib/server/assessments';
import { createClient } from '../../../src/lib/server/clients';
import { addTrace } from '../../../src/lib/server/force-traces';
import { createGate } from '../../../src/lib/server/gates';
import { hashPassword } from '../../../src/lib/server/passwords';
import { addPhoto } from '../../../src/lib/server/photos';
import { reviseAssessment } from '../../../src/lib/server/assessments';
import type { SessionUser } from '../../../src/lib/server/session-user';
import { describeSignLink, sendForSignature, submitSignature } from '../../../src/lib/server/signing';
import { createSite } from '../../../src/lib/server/sites';
import { demoClients, type DemoGate, type DemoSite, type GateCondition } from './directory';
import { forceTraceCsv, gateSketchJpeg, squiggleSignaturePng } from './drawings';
import { demoHomeownerEmail, demoOrganisation, demoPassword, demoStaff } from './people';
import { walkFor, type WalkDocuments } from './walk';

const family = 'north-american-gate';

type Outcome = 'draft' | 'scored' | 'awaiting_signature' | 'signed' | 'revised';

interface Visit {
  versionLabel: string;
  visitedOn: string;
  condition: GateCondition;
  outcome: Outcome;
  auditor: SessionUser;
}

/** Seeds everything; returns how many assessments were made. */
export async function runDemoScenario(knex: Knex): Promise<number> {
  const org = await knex.transaction(async (trx) => {
    const [row] = await trx('organisations').insert(demoOrganisation).returning('id');
    const passwordHash = await hashPassword(demoPassword);
    await trx('users').insert(
      demoStaff.map((s) => ({ ...s, organisation_id: row.id, password_hash: passwordHash })),
    );
    return row.id as string;
  });
  const staff = await knex('users').where({ organisation_id: org }).select('id', 'email', 'name', 'role');
  const viewer = (email: string): SessionUser => {
    const u = staff.find((s) => s.email === email)!;
    return { id: u.id, organisationId: org, email: u.email, name: u.name, role: u.role, clientId: null };
  };
  const owner = viewer('owner@quillmoor.test');
  const office = viewer('office@quillmoor.test');
  const auditors = [viewer('auditor@quillmoor.test'), viewer('auditor2@quillmoor.test')];

  const versions = new Map<string, { id: string; content: RulesetVersion; contentSha256: string }>();
  for (const row of await knex('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .whereNull('r.organisation_id')
    .andWhere('r.family', family)
    .select('rv.id', 'rv.version', 'rv.content', 'rv.content_sha256')) {
    versions.set(row.version, {
      id: row.id,
      content: loadRulesetFile(row.content).version,
      contentSha256: row.content_sha256,
    });
  }
  const labels = [...versions.keys()].sort();
  // The newest version is "just published": the autumn's visits were made under the one before it.
  const current = labels.length > 2 ? labels.at(-2)! : labels.at(-1)!;
  const earlier = labels.at(0)!;

  let gateIndex = 0;
  let made = 0;
  for (const [clientIndex, demoClient] of demoClients.entries()) {
    const client = await createClient(
      owner,
      ClientCreateSchema.parse({
        name: demoClient.name,
        kind: demoClient.kind,
        contactEmail: demoClient.contactEmail,
        phone: demoClient.phone,
      }),
    );
    if (demoClient.contactEmail === demoHomeownerEmail) {
      await knex('users').insert({
        organisation_id: org,
        email: demoHomeownerEmail,
        name: 'Imogen Wren',
        role: 'homeowner',
        client_id: client.id,
      });
    }
    for (const demoSite of demoClient.sites) {
      const site = await createSite(
        owner,
        SiteCreateSchema.parse({
          clientId: client.id,
          name: demoSite.name,
          addressLine1: demoSite.addressLine1,
          city: demoSite.city,
          region: demoSite.region,
          postalCode: demoSite.postalCode,
          country: 'US',
          usageClass: demoSite.usageClass,
          notes: demoSite.notes,
        }),
      );
      for (const demoGate of demoSite.gates) {
        const gate = await createGate(owner, GateCreateSchema.parse(gateBody(site.id, demoGate)));
        for (const visit of visitsFor(gateIndex, clientIndex, earlier, current, auditors)) {
          await carryOut(knex, {
            gate,
            site: demoSite,
            demoGate,
            visit,
            version: versions.get(visit.versionLabel)!,
            office,
            seed: gateIndex * 7 + made,
          });
          made += visit.outcome === 'revised' ? 2 : 1;
        }
        gateIndex++;
      }
    }
  }
  return made;
}

function gateBody(siteId: string, g: DemoGate) {
  return {
    siteId,
    label: g.label,
    kind: g.kind,
    leaves: g.leaves,
    ...(g.openingDirection ? { openingDirection: g.openingDirection } : {}),
    width: g.width,
    height: g.height,
    weight: g.weight,
    operator: {
      listed: true,
      automaticClosing: g.automaticClosing,
      manufacturedOn: g.operatorManufacturedOn,
      mounting: 'post',
      power: 'low_voltage_dc',
    },
    installedOn: g.installedOn,
  };
}

const conditions: GateCondition[] = ['sound', 'needs_work', 'dangerous', 'sound', 'needs_work'];
const currentOutcomes: Outcome[] = ['signed', 'awaiting_signature', 'scored', 'draft', 'revised', 'signed'];

/** Who went when: the first dozen gates had a visit last year on the earlier ruleset, every gate one this autumn. */
function visitsFor(
  i: number,
  clientIndex: number,
  earlier: string,
  current: string,
  auditors: SessionUser[],
): Visit[] {
  const visits: Visit[] = [];
  if (i < 12) {
    const month = String(1 + ((i * 5) % 12)).padStart(2, '0');
    visits.push({
      versionLabel: earlier,
      visitedOn: `2025-${month}-${String(3 + i).padStart(2, '0')}T15:30:00Z`,
      condition: i % 4 === 3 ? 'needs_work' : 'sound',
      outcome: 'signed',
      auditor: auditors[i % 2],
    });
  }
  const day = String(2 + ((i * 3) % 26)).padStart(2, '0');
  const month = ['09', '10', '11'][i % 3];
  visits.push({
    versionLabel: current,
    visitedOn: `2026-${month}-${day}T16:00:00Z`,
    condition: conditions[(i + clientIndex) % conditions.length],
    outcome: currentOutcomes[i % currentOutcomes.length],
    auditor: auditors[(i + 1) % 2],
  });
  return visits;
}

interface VisitWork {
  gate: Gate;
  site: DemoSite;
  demoGate: DemoGate;
  visit: Visit;
  version: { id: string; content: RulesetVersion; contentSha256: string };
  office: SessionUser;
  seed: number;
}

async function carryOut(knex: Knex, work: VisitWork): Promise<void> {
  const { gate, site, demoGate, visit, version, office, seed } = work;
  const auditor = visit.auditor;
  const draft = await createAssessment(
    auditor,
    {
      gateId: gate.id,
      family,
      purpose: visit.versionLabel === version.content.version && seed % 3 === 0 ? 'service' : 'inspection',
      visitedOn: visit.visitedOn,
    },
    { ip: null },
  );
  if (draft.ruleset.versionId !== version.id) {
    // The visit happened when the earlier version was current: pin it as it was then.
    await knex('assessments')
      .where({ id: draft.id, status: 'draft' })
      .update({ ruleset_version_id: version.id });
  }
  const scoringGate = { ...gate, usageClass: site.usageClass };
  const verdictOf = (walk: WalkDocuments) => {
    const built = buildEngineInput(scoringGate, {
      answers: walk.answers as never,
      measurements: walk.measurements as never,
      observations: { site: site.context, ...walk.observations } as never,
    });
    return built.ok
      ? scoreParsed(built.value, { version: version.content, contentSha256: version.contentSha256 }).verdict
      : 'invalid';
  };
  const walk = walkFor(
    demoGate.kind,
    {
      ...site.context,
      openingDirection: demoGate.openingDirection,
      photoEyeNotListed: demoGate.photoEyeNotListed === true,
    },
    visit.condition,
    verdictOf,
    seed,
  );
  if (visit.outcome === 'draft') {
    // Half-way round the gate: the first few sections only.
    const keep = (o: Record<string, unknown>) =>
      Object.fromEntries(Object.entries(o).slice(0, Math.ceil(Object.keys(o).length / 2)));
    walk.answers = keep(walk.answers) as WalkDocuments['answers'];
    walk.measurements = keep(walk.measurements) as WalkDocuments['measurements'];
  }
  const known = new Set(version.content.questions.map((q) => q.key));
  const patch = AssessmentPatchSchema.parse({
    answers: Object.fromEntries(Object.entries(walk.answers).filter(([k]) => known.has(k))),
    measurements: Object.fromEntries(Object.entries(walk.measurements).filter(([k]) => known.has(k))),
    observations: { site: site.context, ...walk.observations },
  });
  const saved = await patchAssessment(auditor, draft.id, 1, patch);
  if (!saved) throw new Error(`demo: could not save ${draft.id}`);

  const photoKeys =
    demoGate.kind === 'swing'
      ? ['hingeGapMm', 'fixedObjectClearanceMm', 'placardsSide1']
      : ['largestOpeningMm', 'rollersGuarded', 'placardsSide1'];
  for (const [n, itemKey] of photoKeys.slice(0, 1 + (seed % 3)).entries()) {
    if (!known.has(itemKey)) continue;
    const bytes = await gateSketchJpeg(`${demoGate.label}: ${itemKey}`, (seed * 37 + n * 61) % 360);
    await addPhoto(auditor, draft.id, {
      itemKey,
      clientRef: null,
      caption: `${demoGate.label}, ${itemKey}`,
      takenAt: new Date(visit.visitedOn),
      fileName: `demo-${n}.jpg`,
      bytes,
    });
  }
  if (seed % 4 === 1 && known.has('forceSetLowest')) {
    const peak = visit.condition === 'dangerous' ? 520 : 330;
    await addTrace(auditor, draft.id, {
      clientRef: null,
      itemKey: 'forceSetLowest',
      fileName: 'closing-edge-300mm.csv',
      location: 'closing_edge',
      direction: 'closing',
      gapMm: 300,
      csv: forceTraceCsv(peak, 120, 12),
    });
  }
  if (visit.outcome === 'draft') return;

  const scored = await submitAssessment(auditor, draft.id, saved.rowVersion, { ip: null });
  if (!scored) throw new Error(`demo: could not submit ${draft.id}`);
  if (visit.outcome === 'scored') return;

  const sent = await sendForSignature(office, draft.id, { ip: null, userAgent: 'Latchwell demo seed' });
  if (visit.outcome === 'awaiting_signature') return;

  const message = await knex('outbox_messages').where({ id: sent.outboxMessageId }).first('text_body');
  const token = /\/sign\/([A-Za-z0-9_-]{43})/.exec(message?.text_body ?? '')?.[1];
  if (!token) throw new Error('demo: no signing link in the queued message');
  const view = await describeSignLink(token);
  if (view.state !== 'ok') throw new Error(`demo: signing link is ${view.state}`);
  await submitSignature(
    token,
    {
      name: work.site.name === 'Home' ? 'Imogen Wren' : `Owner of ${demoGate.label}`,
      consent: true,
      intent: true,
      acknowledgedCautions: view.cautions.map((c) => c.ruleId),
      shownPdfSha256: sent.document.sha256,
      signature: { method: 'drawn', png: await squiggleSignaturePng(seed) },
    },
    { ip: '198.51.100.23', userAgent: 'Mozilla/5.0 (Linux; Android 14) demo phone' },
  );
  if (visit.outcome === 'revised') await reviseAssessment(office, draft.id, { ip: null });
}
