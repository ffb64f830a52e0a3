/**
 * The invented demo contractor and its people. Every name and address here is made up; the
 * e-mail domain is the reserved `.test` TLD.
 */
export const demoPassword = 'gate-demo-2026';

export const demoOrganisation = {
  name: 'Quillmoor Gate Automation',
  slug: 'quillmoor',
  display_units: 'imperial',
  time_zone: 'America/Denver',
  reinspection_months: 12,
} as const;

export const demoStaff = [
  { email: 'owner@quillmoor.test', name: 'Odile Farrow', role: 'owner' },
  { email: 'office@quillmoor.test', name: 'Benedikt Sallow', role: 'office' },
  { email: 'auditor@quillmoor.test', name: 'Priya Tennant', role: 'auditor' },
  { email: 'auditor2@quillmoor.test', name: 'Caspar Oyelaran', role: 'auditor' },
] as const;

/** Homeowners sign in by a one-time e-mailed link; they have no password. */
export const demoHomeownerEmail = 'homeowner@example.test';
