import type { Role } from '@/schemas/common';

const LAB: Role[] = ['technologist', 'director'];

/** Every client route: its pattern, how to build a link to it, and who may open it. */
export const paths = {
  signIn: { path: '/sign-in', href: () => '/sign-in', roles: null },
  home: { path: '/', href: () => '/', roles: null },
  cases: { path: '/cases', href: (search = '') => `/cases${search}`, roles: LAB },
  caseNew: { path: '/cases/new', href: () => '/cases/new', roles: LAB },
  caseDetail: { path: '/cases/:id', href: (id: number) => `/cases/${id}`, roles: LAB },
  caseHistory: { path: '/cases/:id/history', href: (id: number) => `/cases/${id}/history`, roles: LAB },
  caseAssays: { path: '/cases/:id/assays', href: (id: number) => `/cases/${id}/assays`, roles: LAB },
  caseResults: { path: '/cases/:id/results', href: (id: number) => `/cases/${id}/results`, roles: LAB },
  patientCorrect: {
    path: '/patients/:id/correct',
    href: (id: number, fromCase?: number) => `/patients/${id}/correct${fromCase ? `?case=${fromCase}` : ''}`,
    roles: LAB,
  },
  plateMaps: { path: '/plate-maps', href: () => '/plate-maps', roles: LAB },
  runs: { path: '/runs', href: (search = '') => `/runs${search}`, roles: LAB },
  runNew: { path: '/runs/new', href: () => '/runs/new', roles: LAB },
  runDetail: { path: '/runs/:id', href: (id: number) => `/runs/${id}`, roles: LAB },
  calculator: { path: '/rate-check', href: () => '/rate-check', roles: LAB },
  review: { path: '/review', href: () => '/review', roles: ['director'] as Role[] },
  reviewCase: { path: '/review/:id', href: (id: number) => `/review/${id}`, roles: ['director'] as Role[] },
  assayDefinitions: { path: '/assays', href: () => '/assays', roles: ['director'] as Role[] },
  intervals: { path: '/intervals', href: () => '/intervals', roles: LAB },
  intervalNew: { path: '/intervals/new', href: () => '/intervals/new', roles: ['director'] as Role[] },
  intervalDerive: { path: '/intervals/derive', href: () => '/intervals/derive', roles: ['director'] as Role[] },
  intervalVerify: { path: '/intervals/verify', href: () => '/intervals/verify', roles: ['director'] as Role[] },
  intervalDetail: { path: '/intervals/:id', href: (id: number) => `/intervals/${id}`, roles: LAB },
  qc: { path: '/qc', href: () => '/qc', roles: LAB },
  qcMaterial: { path: '/qc/materials/:id', href: (id: number) => `/qc/materials/${id}`, roles: LAB },
  cohorts: { path: '/cohorts', href: (search = '') => `/cohorts${search}`, roles: LAB },
  myReports: { path: '/my-reports', href: () => '/my-reports', roles: ['clinician'] as Role[] },
  adminUsers: { path: '/admin/accounts', href: () => '/admin/accounts', roles: ['admin'] as Role[] },
  adminLab: { path: '/admin/laboratory', href: () => '/admin/laboratory', roles: ['admin'] as Role[] },
  adminOutbox: { path: '/admin/outbox', href: () => '/admin/outbox', roles: ['admin'] as Role[] },
  accountPassword: { path: '/account/password', href: () => '/account/password', roles: null },
  forbidden: { path: '/forbidden', href: () => '/forbidden', roles: null },
} as const;

export type PathName = keyof typeof paths;

/** Where each role lands after signing in. */
export const landingFor: Record<Role, string> = {
  technologist: paths.cases.href(),
  director: paths.review.href(),
  clinician: paths.myReports.href(),
  admin: paths.adminUsers.href(),
};

/** The navigation, in order; each entry shows only to the roles its route allows. */
export const navigation: { name: PathName; label: string }[] = [
  { name: 'review', label: 'Awaiting sign-out' },
  { name: 'cases', label: 'Cases' },
  { name: 'caseNew', label: 'Register a case' },
  { name: 'calculator', label: 'Rate check' },
  { name: 'plateMaps', label: 'Plate layouts' },
  { name: 'runs', label: 'Runs' },
  { name: 'intervals', label: 'Reference intervals' },
  { name: 'cohorts', label: 'Cohorts' },
  { name: 'qc', label: 'Quality control' },
  { name: 'assayDefinitions', label: 'Assay definitions' },
  { name: 'myReports', label: 'Reports for my patients' },
  { name: 'adminUsers', label: 'Accounts' },
  { name: 'adminLab', label: 'Laboratory profile' },
  { name: 'adminOutbox', label: 'Sent e-mail' },
];

export function canOpen(name: PathName, role: Role): boolean {
  const roles = paths[name].roles as Role[] | null;
  return roles === null || roles.includes(role);
}
