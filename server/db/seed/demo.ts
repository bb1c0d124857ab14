import type { Sequelize } from 'sequelize';
import type { Role } from '@/schemas/common';
import { hashPassword } from '../../auth/password';
import { saveLabProfile } from '../../modules/lab-profile/lab-profile.service';
import { countUsers, insertUser } from '../../modules/users/users.repository';
import { seedDemoCases } from './demo-cases';
import { seedDemoIntervals } from './demo-intervals';
import type { NoticeDeps } from '../../modules/mail/notices.service';
import { seedDemoReports } from './demo-reports';
import { seedDemoMeasurements } from './demo-measurements';
import { seedDemoRuns } from './demo-runs';

/** Invented staff of an invented laboratory. No real people or institutions. */
export const demoAccounts: { email: string; name: string; title: string; role: Role }[] = [
  { email: 'technologist@demo.test', name: 'Tamsin Oduya', title: 'Senior technologist', role: 'technologist' },
  { email: 'director@demo.test', name: 'Dr Ilse Marchetti', title: 'Laboratory director', role: 'director' },
  // A second director, so the demo shows new interval and definition versions approved by someone else.
  { email: 'director2@demo.test', name: 'Dr Octavian Brisk-Ferro', title: 'Associate laboratory director', role: 'director' },
  { email: 'clinician@demo.test', name: 'Dr Rafael Quenby', title: 'Paediatric neurologist', role: 'clinician' },
  { email: 'clinician2@demo.test', name: 'Dr Noor Halvorsen', title: 'Metabolic physician', role: 'clinician' },
  { email: 'admin@demo.test', name: 'Priya Delacroix-Wen', title: 'Systems administrator', role: 'admin' },
];

export const demoLabProfile = {
  name: 'Fernhollow Metabolic Laboratory (fictitious demo)',
  addressLines: ['Mitochondrial Section, Level 3', '12 Example Row', 'Fernhollow FH1 0AA (fictitious)'],
  accreditationNumber: 'DEMO-ACC-0000',
  phone: '+00 0000 000000',
  timeZone: 'Europe/London',
  version: 0,
};

/**
 * Seeds the demo scenario when the database has no accounts. Returns whether it seeded. With `notices`, the
 * seeded reports e-mail their notices like real ones, so the demo's sent-mail page has something to show.
 */
export async function seedDemoIfEmpty(sequelize: Sequelize, demoPassword: string, notices: NoticeDeps | null = null): Promise<boolean> {
  if ((await countUsers()) > 0) return false;
  const passwordHash = await hashPassword(demoPassword);
  await sequelize.transaction(async (transaction) => {
    for (const a of demoAccounts) await insertUser({ ...a, passwordHash }, transaction);
  });
  await saveLabProfile(sequelize, null, demoLabProfile);
  await seedDemoIntervals(sequelize);
  const demoCaseIds = await seedDemoCases(sequelize);
  await seedDemoMeasurements(sequelize, demoCaseIds);
  await seedDemoRuns(sequelize, demoCaseIds);
  // Last: signs cases the seeds above left awaiting review.
  await seedDemoReports(sequelize, demoCaseIds, notices);
  return true;
}
