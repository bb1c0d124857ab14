import { describe, expect, it } from 'vitest';
import { roles, type Role } from '@/schemas/common';
import { allows, openBeforePasswordChange, permissions, type Access } from '../../../../server/auth/permissions';

/*
 * The permissions table read without HTTP, against the product brief's role table (shared/docs/product.md, "Who
 * uses it") and docs/api.md's "who" column [confirmed: the brief and the API contract]. The full route × role walk
 * over HTTP is tests/api/role-matrix.api.test.ts; this file pins the rows whose roles are written out inline
 * (not through the shared laboratory, director and administrator lists) and the meaning of each kind of row.
 */
const who = (key: keyof typeof permissions) => roles.filter((r) => allows(permissions[key], r)).sort();
const LAB = ['director', 'technologist'];

describe('allows', () => {
  it('a public row admits everyone, even without a session; a signed-in row every role but nobody signed out; a list only its roles', () => {
    const list: Access = ['director'];
    expect(allows('public', undefined)).toBe(true);
    expect(allows('signed-in', undefined)).toBe(false);
    expect(allows(list, undefined)).toBe(false);
    for (const role of roles) {
      expect(allows('public', role)).toBe(true);
      expect(allows('signed-in', role)).toBe(true);
      expect(allows(list, role)).toBe(role === 'director');
      expect(allows([], role)).toBe(false);
    }
  });
});

describe('rows against the brief', () => {
  it('only the health check and signing in need no session; the own-account routes and the laboratory profile need any account', () => {
    // [confirmed] docs/api.md: health and login "anyone"; logout, me, password and GET lab-profile "signed in".
    const publicKeys = Object.entries(permissions).filter(([, a]) => a === 'public').map(([k]) => k).sort();
    expect(publicKeys).toEqual(['GET /api/health', 'POST /api/auth/login']);
    const signedIn = Object.entries(permissions).filter(([, a]) => a === 'signed-in').map(([k]) => k).sort();
    expect(signedIn).toEqual(['GET /api/auth/me', 'GET /api/lab-profile', 'POST /api/auth/logout', 'POST /api/auth/password']);
  });
  it('the audit trail is read by administrators and directors', () => {
    // [confirmed] docs/api.md: GET /api/audit "admin, director".
    expect(who('GET /api/audit')).toEqual(['admin', 'director']);
  });
  it('reports are read by the laboratory and the referring clinician; cases in progress by the clinician alone', () => {
    // [confirmed] brief: a clinician "reads final and corrected reports of the cases referred by them only;
    // downloads the PDF"; administrators never see clinical data.
    for (const key of ['GET /api/reports', 'GET /api/reports/by-case', 'GET /api/reports/:id', 'GET /api/reports/:id/pdf', 'GET /api/reports/:id/fhir'] as const) {
      expect(who(key)).toEqual(['clinician', ...LAB].sort());
    }
    expect(who('GET /api/reports/in-progress')).toEqual(['clinician']);
  });
  it('the shared lists: laboratory work, the director\'s signature and the administrator\'s accounts', () => {
    // [confirmed] brief: technologists register cases; directors also sign; admins manage accounts.
    expect(who('POST /api/cases')).toEqual(LAB);
    expect(who('POST /api/cases/:id/sign')).toEqual(['director']);
    expect(who('POST /api/users')).toEqual(['admin']);
  });
  it('every row names a method and an /api path, and every role list holds known roles', () => {
    for (const [key, access] of Object.entries(permissions) as [string, Access][]) {
      expect(key).toMatch(/^(GET|POST|PUT|PATCH|DELETE) \/api\//);
      if (typeof access !== 'string') for (const r of access) expect(roles).toContain(r as Role);
    }
  });
});

describe('before a temporary password is replaced', () => {
  it('only me, sign-out and the password change stay open', () => {
    // [confirmed] docs/api.md: after an administrator's reset "the person must choose their own at the next
    // sign-in"; OWASP ASVS 4.0 2.5.2 (no use of a temporary secret beyond changing it).
    expect([...openBeforePasswordChange].sort()).toEqual(['GET /api/auth/me', 'POST /api/auth/logout', 'POST /api/auth/password']);
  });
});
