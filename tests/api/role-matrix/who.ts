import type { Role } from '@/schemas/common';

/*
 * Who may call what, written from the product brief's role table (shared/docs/product.md, "Who uses it") and
 * the issues that refined it — never from server/auth/permissions.ts. The server's own table is checked against
 * this one, route by route and role by role, so a wrong row there fails here.
 *
 * - technologist: cases, patients, specimens, protein, assay data, results, submission; reads definitions,
 *   intervals and reports of the laboratory; never signs, never changes definitions or intervals.
 * - director: all of that, plus definitions, intervals and their control data, review, signing, corrections,
 *   reopening, rejection reasons; reads the whole audit trail.
 * - clinician: the reports of their own referrals (list, one report, its PDF) and their cases in progress.
 * - admin: accounts, the laboratory profile, the mail outbox, and the non-clinical audit trail; no clinical data.
 */
export type Expected = 'public' | 'signed-in' | readonly Role[];
const LAB: readonly Role[] = ['technologist', 'director'];

export function expected(method: string, path: string): Expected {
  const route = `${method.toUpperCase()} ${path}`;
  if (route === 'GET /api/health' || route === 'POST /api/auth/login') return 'public';
  if (path.startsWith('/api/auth/') || route === 'GET /api/lab-profile') return 'signed-in';
  if (path === '/api/lab-profile' || path.startsWith('/api/users') || path.startsWith('/api/outbox')) return ['admin'];
  if (path === '/api/audit') return ['admin', 'director'];
  if (path === '/api/reports/in-progress') return ['clinician'];
  if (path.startsWith('/api/reports')) return [...LAB, 'clinician'];
  // Signing, corrections, reopening and review are the director's.
  if (/^\/api\/cases\/:id\/(sign|correct|amend)$/.test(path) || path.startsWith('/api/review')) return ['director'];
  // Definitions and intervals: everyone in the laboratory reads them; only a director changes them.
  if (path.startsWith('/api/assay-definitions') || path.startsWith('/api/rejection-reasons')) {
    return method === 'get' ? LAB : ['director'];
  }
  if (path.startsWith('/api/reference-intervals')) {
    // The control data behind an interval is interval-management work, except reading the file an
    // interval's history links to, which every laboratory reader of that history may open.
    if (path === '/api/reference-intervals/controls/:id/file') return LAB;
    if (path.startsWith('/api/reference-intervals/controls')) return ['director'];
    // derive, verify and partition are calculations a director does while managing intervals.
    return method === 'get' ? LAB : ['director'];
  }
  // The registry export, identified or de-identified, is the director's alone (issue 13: "directors only; others 403").
  if (path === '/api/registry/export.csv') return ['director'];
  // Cohort search, its plots and saved searches: directors and technologists (issue 13), never clinicians or admins.
  if (path.startsWith('/api/registry/cohort') || path.startsWith('/api/registry/saved-searches')) return LAB;
  // Quality control (issue 12): the stateless Westgard evaluation is for technologists and directors; the rule
  // selection, control materials and their targets are read by the laboratory and changed only by a director.
  if (path === '/api/qc/evaluate') return LAB;
  if (path === '/api/qc/rules' || path.startsWith('/api/control-materials') || path.startsWith('/api/control-targets')) {
    return method === 'get' ? LAB : ['director'];
  }
  // Runs (issue 12): the laboratory imports and reads runs; "a director can release them only with a documented
  // override", so the override is the director's alone.
  if (path === '/api/runs/:id/override') return ['director'];
  // Everything else is assay work on cases: the laboratory only.
  return LAB;
}

export const allowed = (e: Expected, role: Role) => e === 'public' || e === 'signed-in' || e.includes(role);
