/** What a request knows about who is asking, as put on `Astro.locals` by the middleware. */
export type Role = 'owner' | 'office' | 'auditor' | 'homeowner';

export const staffRoles: readonly Role[] = ['owner', 'office', 'auditor'];

export interface SessionUser {
  id: string;
  organisationId: string;
  email: string;
  name: string;
  role: Role;
  /** Set for homeowners / property managers: the client whose sites and documents they see. */
  clientId: string | null;
}

export interface SessionOrganisation {
  id: string;
  name: string;
  slug: string;
  displayUnits: 'imperial' | 'metric';
  timeZone: string;
  reinspectionMonths: number;
  remindClients: boolean;
}
