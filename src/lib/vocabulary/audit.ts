/** Mail kinds, audit-trail actions and the things they happened to, in words. */
import { humanise } from './humanise';

export const MAIL_KIND_LABEL: Record<string, string> = {
  sign_request: 'Link to sign',
  signed_report: 'Signed report to the client',
  signed_report_copy: 'Copy for the office',
};

export const AUDIT_ACTION_LABEL: Record<string, string> = {
  'assessment.created': 'Assessment started',
  'assessment.submitted': 'Assessment submitted and scored',
  'assessment.discarded': 'Draft discarded',
  'assessment.sent_for_signature': 'Sent for signature',
  'assessment.signed': 'Signed by the client',
  'assessment.revised': 'Revision started',
  'archive.exported': 'Archive exported',
  'client.created': 'Client added',
  'client.updated': 'Client corrected',
  'gate.created': 'Gate added',
  'gate.duplicated': 'Gate duplicated',
  'gate.updated': 'Gate corrected',
  'gate.deleted': 'Gate deleted',
  'invitation.created': 'Invitation sent',
  'invitation.accepted': 'Invitation accepted',
  'invitation.revoked': 'Invitation cancelled',
  'organisation.settings_changed': 'Settings changed',
  'site.created': 'Site added',
  'site.updated': 'Site corrected',
  'site.deleted': 'Site deleted',
  'reinspection.reminders_queued': 'Re-inspection reminders queued',
  'ruleset.amendment.derived': 'Ruleset amendment started',
  'ruleset.amendment.edited': 'Ruleset amendment edited',
  'ruleset.amendment.published': 'Ruleset amendment published',
  'ruleset.amendment.deleted': 'Ruleset amendment deleted',
  'sign_in.succeeded': 'Signed in',
  'sign_in.failed': 'Sign-in refused',
  'sign_in.throttled': 'Sign-in paused after too many tries',
  'sign_in.link_sent': 'Sign-in link sent',
  sign_out: 'Signed out',
};

export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABEL[action] ?? humanise(action.replace(/\./g, ' '));
}

export const ENTITY_LABEL: Record<string, string> = {
  assessment: 'Assessment',
  user: 'Person',
  gate: 'Gate',
  invitation: 'Invitation',
  organisation: 'Organisation',
  ruleset_version: 'Ruleset version',
  archive: 'Archive',
};
