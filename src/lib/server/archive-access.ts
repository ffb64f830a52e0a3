/**
 * Who may use the archive. The office runs it (search, export, reminders, impact lists); an
 * auditor reads a gate's history before a return visit; only the owner reads the audit trail.
 * The verification page is public and answers nothing but "genuine or not".
 */
import type { Role } from './session-user';

export const archiveReaders: readonly Role[] = ['owner', 'office'];
export const gateHistoryReaders: readonly Role[] = ['owner', 'office', 'auditor'];
export const auditReaders: readonly Role[] = ['owner'];
