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
  'POST /api/calculations/activity': LAB,
} as const satisfies Record<string, Access>;

export type RouteKey = keyof typeof permissions;

export function allows(access: Access, role: Role | undefined): boolean {
  if (access === 'public') return true;
  if (!role) return false;
  if (access === 'signed-in') return true;
  return access.includes(role);
}
