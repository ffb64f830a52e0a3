/**
 * Who may do what with the organisation's directory (clients, sites, gates) and assessments.
 * Endpoints pass these to `requireRole`; row-level limits (a homeowner's own client, an
 * auditor's own drafts) live in the aggregate modules.
 */
import type { Role } from './session-user';

/** Everyone signed in reads; a homeowner's reads are limited to their own client. */
export const directoryReaders: readonly Role[] = ['owner', 'office', 'auditor', 'homeowner'];
/** Field work: auditors add and correct clients, sites and gates on site. */
export const directoryWriters: readonly Role[] = ['owner', 'office', 'auditor'];
/** Removing records is office work. */
export const directoryDeleters: readonly Role[] = ['owner', 'office'];

/** Reading assessments: staff see all; a homeowner sees those sent to their client. */
export const assessmentReaders: readonly Role[] = ['owner', 'office', 'auditor', 'homeowner'];
/** Starting, editing and submitting: staff (an auditor only their own). */
export const assessmentWorkers: readonly Role[] = ['owner', 'office', 'auditor'];
