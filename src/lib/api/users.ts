/** People of the organisation as the API speaks of them, and the staff invitation. */
import { z } from 'zod';
import { pagingShape, sortSchema, text } from './common';

export const ROLES = ['owner', 'office', 'auditor', 'homeowner'] as const;
export const STAFF_ROLES = ['owner', 'office', 'auditor'] as const;
export type StaffRole = (typeof STAFF_ROLES)[number];

/** How each role is named on screens and in e-mails. */
export const roleLabels: Record<(typeof ROLES)[number], string> = {
  owner: 'Owner',
  office: 'Office',
  auditor: 'Auditor',
  homeowner: 'Homeowner / property manager',
};

const staffRole = z.enum(STAFF_ROLES, `must be one of: ${STAFF_ROLES.join(', ')}`);

const booleanParam = z.enum(['true', 'false'], 'must be true or false').transform((v) => v === 'true');

export const UserListQuerySchema = z.strictObject({
  role: z.enum(ROLES, `must be one of: ${ROLES.join(', ')}`).optional(),
  active: booleanParam.optional(),
  sort: sortSchema(['name', 'email', 'role', 'createdAt', 'lastSignedInAt'], 'name'),
  ...pagingShape,
});
export type UserListQuery = z.infer<typeof UserListQuerySchema>;

/** PATCH /api/users/{id}: a staff member's role, whether they may sign in, their name. */
export const UserPatchSchema = z
  .strictObject({ role: staffRole, active: z.boolean('must be true or false'), name: text(120) })
  .partial()
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change');
export type UserPatch = z.infer<typeof UserPatchSchema>;

export interface User {
  id: string;
  email: string;
  name: string;
  role: (typeof ROLES)[number];
  active: boolean;
  clientId: string | null;
  lastSignedInAt: string | null;
  createdAt: string;
}

export const EmailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .pipe(z.email('must be an e-mail address').max(254, 'must be at most 254 characters'));

export const InvitationCreateSchema = z.strictObject({ email: EmailSchema, role: staffRole });
export type InvitationCreate = z.infer<typeof InvitationCreateSchema>;

/** Common practice (NIST SP 800-63B asks for at least 8; we ask a little more), no upper bound below 256. */
export const PASSWORD_MIN = 10;
export const PasswordSchema = z
  .string()
  .min(PASSWORD_MIN, `must be at least ${PASSWORD_MIN} characters`)
  .max(256, 'must be at most 256 characters');

export const InvitationAcceptSchema = z.strictObject({ name: text(120), password: PasswordSchema });
export type InvitationAccept = z.infer<typeof InvitationAcceptSchema>;

/** POST /api/account/password: the person's own password, proven by the current one. */
export const PasswordChangeSchema = z.strictObject({
  currentPassword: z.string('is required').min(1, 'is required').max(256, 'must be at most 256 characters'),
  newPassword: PasswordSchema,
});
export type PasswordChange = z.infer<typeof PasswordChangeSchema>;

export interface Invitation {
  id: string;
  email: string;
  role: StaffRole;
  expiresAt: string;
  createdAt: string;
}
