/**
 * Submitting a draft: in one transaction, lock the draft, then the gate, its site and client
 * (shared, so none can change until the commit), build the engine input from the gate as it
 * stands, its site and the draft's documents, score it with the pinned ruleset version, and
 * store the result, its SHA-256 and the verdict, with an audit event. The same UPDATE makes
 * the database freeze the scored record (gate, site, client, people, ruleset, documents and
 * result; see scored-record.ts), which is what every report renders from, forever.
 */
import { assertCarriedForwardConfirmed, carriedForwardOf } from './carry-forward';
import type { Assessment } from '@/lib/api/assessments';
import type { Gate } from '@/lib/api/gates';
import { AssessmentInputError, resultSha256, scoreParsed, type RulesetVersion } from '@/lib/rules';
import { buildEngineInput } from '../assessment-input';
import { assertEditable, getAssessment, type RequestFacts } from './drafts';
import { recordAudit } from '../audit';
import { db } from '../db';
import { getGate } from '../gates';
import { InvalidInputError } from '../errors';
import type { SessionUser } from '../session-user';

/** Engine input paths as the API names them. */
function apiField(path: string): string {
  if (path.startsWith('site.')) return `observations.${path}`;
  return path;
}

export async function submitAssessment(
  viewer: SessionUser,
  id: string,
  expectedVersion: number | undefined,
  request: RequestFacts,
): Promise<Assessment | null> {
  return db().transaction(async (trx) => {
    const locked = await trx('assessments')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first('id');
    if (!locked) return null;
    const current = await getAssessment(viewer, id, trx);
    if (!current) return null;
    assertEditable(viewer, current, expectedVersion);
    assertCarriedForwardConfirmed(await carriedForwardOf(trx, viewer.organisationId, id));

    // Locked before reading: what is scored is what the record freezes at the UPDATE below.
    await trx('gates as g')
      .join('sites as s', 's.id', 'g.site_id')
      .join('clients as c', 'c.id', 's.client_id')
      .where('g.id', current.gate.id)
      .forShare('g', 's', 'c')
      .first('g.id');
    const gate = (await getGate(viewer, current.gate.id, trx)) as Gate;
    const site = await trx('sites')
      .where({ id: gate.siteId })
      .first<{ usage_class: number; address_line1: string; city: string; name: string | null }>(
        'usage_class',
        'address_line1',
        'city',
        'name',
      );
    const pinned = await trx('ruleset_versions')
      .where({ id: current.ruleset.versionId })
      .first<{ content: RulesetVersion; content_sha256: string }>('content', 'content_sha256');
    const { content, content_sha256: contentSha256 } = pinned as {
      content: RulesetVersion;
      content_sha256: string;
    };

    const built = buildEngineInput({ ...gate, usageClass: site?.usage_class ?? 0 }, current);
    if (!built.ok) throw new InvalidInputError('The assessment is not ready to submit.', built.errors);
    let result;
    try {
      result = scoreParsed(built.value, { version: content, contentSha256 });
    } catch (error) {
      if (error instanceof AssessmentInputError) {
        throw new InvalidInputError(
          'The assessment is not ready to submit.',
          error.issues.map((i) => ({ field: apiField(i.path), message: i.message })),
        );
      }
      throw error;
    }
    const sha256 = resultSha256(result);
    await trx('assessments')
      .where({ id, row_version: current.rowVersion, status: 'draft' })
      .update({
        status: 'scored',
        result: JSON.stringify(result),
        result_sha256: sha256,
        verdict: result.verdict,
        submitted_at: trx.fn.now(),
        row_version: current.rowVersion + 1,
        updated_at: trx.fn.now(),
      });
    await recordAudit(trx, {
      organisationId: viewer.organisationId,
      actorUserId: viewer.id,
      actorLabel: viewer.email,
      action: 'assessment.submitted',
      entityType: 'assessment',
      entityId: id,
      ip: request.ip,
      detail: {
        verdict: result.verdict,
        resultSha256: sha256,
        inputSha256: result.inputSha256,
        family: current.ruleset.family,
        version: current.ruleset.version,
        rulesetVersionId: current.ruleset.versionId,
        complete: result.complete,
      },
    });
    return getAssessment(viewer, id, trx);
  });
}
