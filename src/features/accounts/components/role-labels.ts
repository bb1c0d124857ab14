import type { Role } from '@/schemas/common';

export const roleLabels: Record<Role, string> = {
  technologist: 'Technologist',
  director: 'Director',
  clinician: 'Referring clinician',
  admin: 'Administrator',
};
