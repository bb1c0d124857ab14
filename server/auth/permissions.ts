import type { Role } from '@/schemas/common';

/**
 * Who may call each API route: the one declared table the server enforces.
 * 'public' needs no session; 'signed-in' needs any active account; a role list names the roles allowed.
 * Every route the server registers must have a row here (route() refuses a key that is missing),
 * and tests walk the whole table for every role.
 */
export type Access = 'public' | 'signed-in' | readonly Role[];

const LAB: readonly Role[] = ['technologist', 'director'];
const DIRECTOR: readonly Role[] = ['director'];
const ADMIN: readonly Role[] = ['admin'];

export const permissions = {
  'GET /api/health': 'public',
  'POST /api/auth/login': 'public',
  'POST /api/auth/logout': 'signed-in',
  'GET /api/auth/me': 'signed-in',
  'POST /api/auth/password': 'signed-in',
  'GET /api/lab-profile': 'signed-in',
  'PUT /api/lab-profile': ADMIN,
  'GET /api/users': ADMIN,
  'POST /api/users': ADMIN,
  'PATCH /api/users/:id': ADMIN,
  'POST /api/users/:id/password': ADMIN,
  'GET /api/clinicians': LAB,
  'GET /api/audit': [...ADMIN, ...DIRECTOR],
  'GET /api/assay-definitions': LAB,
  'GET /api/assay-definitions/:code/versions': LAB,
  'POST /api/assay-definitions/:code/versions': DIRECTOR,
  'POST /api/assay-definitions/:code/versions/:version/approve': DIRECTOR,
  'POST /api/assay-definitions/:code/versions/:version/withdraw': DIRECTOR,
  'POST /api/calculations/activity': LAB,
  'GET /api/patients/search': LAB,
  'POST /api/patients': LAB,
  'GET /api/patients/:id': LAB,
  'PATCH /api/patients/:id': LAB,
  'GET /api/cases': LAB,
  'POST /api/cases': LAB,
  'GET /api/cases/:id': LAB,
  'PATCH /api/cases/:id': LAB,
  'POST /api/cases/:id/cancel': LAB,
  'GET /api/cases/:id/history': LAB,
  'POST /api/cases/:id/specimens': LAB,
  'PATCH /api/specimens/:id': LAB,
  'GET /api/rejection-reasons': LAB,
  'POST /api/rejection-reasons': DIRECTOR,
  // Reference intervals: technologists read them; directors create, derive, verify and approve.
  'GET /api/reference-intervals': LAB,
  'POST /api/reference-intervals': DIRECTOR,
  'POST /api/reference-intervals/derive': DIRECTOR,
  'POST /api/reference-intervals/verify': DIRECTOR,
  'POST /api/reference-intervals/partition': DIRECTOR,
  'GET /api/reference-intervals/controls': DIRECTOR,
  'POST /api/reference-intervals/controls': DIRECTOR,
  'GET /api/reference-intervals/controls/:id': DIRECTOR,
  'GET /api/reference-intervals/controls/:id/file': LAB,
  'POST /api/reference-intervals/controls/:id/preview': DIRECTOR,
  'POST /api/reference-intervals/controls/:id/draft': DIRECTOR,
  'GET /api/reference-intervals/:id': LAB,
  'GET /api/reference-intervals/:id/history': LAB,
  'PATCH /api/reference-intervals/:id': DIRECTOR,
  'POST /api/reference-intervals/:id/approve': DIRECTOR,
  'POST /api/reference-intervals/:id/retire': DIRECTOR,
  // Quality control: the stateless Westgard evaluation and the laboratory's rules; control materials and their
  // targets (technologists read them, directors create, edit, retire, set and approve targets).
  'POST /api/qc/evaluate': LAB,
  'GET /api/qc/rules': LAB,
  'PUT /api/qc/rules': DIRECTOR,
  'GET /api/control-materials': LAB,
  'POST /api/control-materials': DIRECTOR,
  'GET /api/control-materials/:id': LAB,
  'PATCH /api/control-materials/:id': DIRECTOR,
  'GET /api/control-materials/:id/chart': LAB,
  'POST /api/control-materials/:id/targets': DIRECTOR,
  'POST /api/control-materials/:id/targets/establish': DIRECTOR,
  'POST /api/control-targets/:id/approve': DIRECTOR,
  // Analytical runs: one plate for several cases and the controls. The laboratory lists, previews and imports
  // them; only a director releases a run whose controls did not pass (password typed again).
  'GET /api/runs': LAB,
  'GET /api/runs/open-specimens': LAB,
  'GET /api/runs/:id': LAB,
  'POST /api/runs/preview': LAB,
  'POST /api/runs': LAB,
  'POST /api/runs/:id/override': DIRECTOR,
  // Signed reports: laboratory staff read all; a clinician reads the cases they referred (the service filters,
  // and answers 404 for anything else); administrators none. Only a director signs or corrects.
  'GET /api/reports': [...LAB, 'clinician'],
  'GET /api/reports/by-case': [...LAB, 'clinician'],
  // The referring clinician's own cases not reported yet (state in words, no results).
  'GET /api/reports/in-progress': ['clinician'],
  'GET /api/reports/:id': [...LAB, 'clinician'],
  'GET /api/reports/:id/pdf': [...LAB, 'clinician'],
  // The same signed version as an HL7 FHIR R4 Bundle: the PDF's readers.
  'GET /api/reports/:id/fhir': [...LAB, 'clinician'],
  'GET /api/cases/:id/reports': LAB,
  'POST /api/cases/:id/sign': DIRECTOR,
  'POST /api/cases/:id/correct': DIRECTOR,
  // Reopen a signed case to correct its results (password typed again, as for a signature).
  'POST /api/cases/:id/amend': DIRECTOR,
  'GET /api/review': DIRECTOR,
  'GET /api/review/:id': DIRECTOR,
  'PUT /api/review/:id/draft': DIRECTOR,
  'POST /api/review/:id/return': DIRECTOR,
  'GET /api/outbox': ADMIN,
  'POST /api/outbox/notices/:id/retry': ADMIN,
  // Assay work on a case (measurements, protein, plate files, plate maps, results, submission): the laboratory only.
  'GET /api/cases/:id/workup': LAB,
  'GET /api/cases/:id/measurements': LAB,
  'POST /api/cases/:id/measurements/preview': LAB,
  'POST /api/cases/:id/measurements': LAB,
  'PUT /api/measurements/:id': LAB,
  'DELETE /api/measurements/:id': LAB,
  'POST /api/measurements/:id/exclude': LAB,
  'POST /api/measurements/:id/include': LAB,
  'POST /api/protein-curves/preview': LAB,
  'PUT /api/specimens/:id/protein': LAB,
  'POST /api/cases/:id/plate-uploads/preview': LAB,
  'POST /api/cases/:id/plate-uploads': LAB,
  'GET /api/cases/:id/uploads': LAB,
  'GET /api/uploads/:id/download': LAB,
  'GET /api/plate-maps': LAB,
  'GET /api/plate-maps/:id': LAB,
  'POST /api/plate-maps': LAB,
  'PATCH /api/plate-maps/:id': LAB,
  'DELETE /api/plate-maps/:id': LAB,
  'GET /api/cases/:id/results': LAB,
  'POST /api/cases/:id/submit': LAB,
  // Cohorts: signed results searched as a group, their plots, and each user's own saved searches.
  'GET /api/registry/cohort': LAB,
  'GET /api/registry/cohort/plots': LAB,
  'GET /api/registry/saved-searches': LAB,
  'POST /api/registry/saved-searches': LAB,
  'DELETE /api/registry/saved-searches/:id': LAB,
  // The registry export, identified or de-identified (?deidentified=true): directors only, every export audited.
  'GET /api/registry/export.csv': DIRECTOR,
} as const satisfies Record<string, Access>;

export type RouteKey = keyof typeof permissions;

/**
 * The only routes open to someone whose password was set by an administrator, until they choose their own:
 * every other route answers 403 PASSWORD_CHANGE_REQUIRED (so nobody signs with a password someone else chose).
 */
export const openBeforePasswordChange: ReadonlySet<RouteKey> = new Set<RouteKey>([
  'GET /api/auth/me',
  'POST /api/auth/logout',
  'POST /api/auth/password',
]);

export function allows(access: Access, role: Role | undefined): boolean {
  if (access === 'public') return true;
  if (!role) return false;
  if (access === 'signed-in') return true;
  return access.includes(role);
}
