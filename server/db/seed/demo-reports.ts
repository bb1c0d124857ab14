import type { Sequelize } from 'sequelize';
import type { User } from '@/schemas/user';
import { findCaseById } from '../../modules/cases/cases.repository';
import { correctReport, loadReportMaterial, proposalFor, signCase } from '../../modules/reports/report-signing.service';
import type { NoticeDeps } from '../../modules/mail/notices.service';
import { findUserByEmail, publicUser } from '../../modules/users/users.repository';
import type { DemoCaseIds, DemoCaseName } from './demo-cases';

/*
 * Signed reports of the fictitious Fernhollow laboratory, signed by its invented director. Runs after the
 * other seeds have brought cases to "awaiting review": it signs most of them (final reports), corrects one
 * (a corrected version 2 and a superseded version 1), and leaves the rest in the director's queue so the
 * demo has something to sign. Notices are e-mailed only when the caller passes a mailer (npm start does).
 */

/**
 * Signed as final; the "corrected" case is signed and then corrected. The others (an urgent case referred by the
 * first demo clinician, a routine one by the second) stay in the director's queue.
 */
const SIGN: DemoCaseName[] = ['normal', 'isolatedCIV', 'combined', 'raisedCS', 'corrected'];

async function director(): Promise<User> {
  const u = await findUserByEmail('director@demo.test');
  if (!u) throw new Error('demo seed: the demo director account is missing');
  return publicUser(u);
}

export type DemoReportIds = Partial<Record<DemoCaseName, number>>;

/** Signs (and corrects) the demo cases that are awaiting review; returns the report id now in force per case. */
export async function seedDemoReports(
  sequelize: Sequelize,
  ids: Partial<DemoCaseIds>,
  notices: NoticeDeps | null = null,
): Promise<DemoReportIds> {
  const actor = await director();
  const out: DemoReportIds = {};
  for (const name of SIGN) {
    const caseId = ids[name];
    if (caseId === undefined) continue;
    const c = await findCaseById(caseId);
    if (!c || c.state !== 'awaiting_review') continue;
    const signed = await signCase(
      sequelize,
      notices,
      actor,
      caseId,
      { password: '', version: c.version },
      // Signed at the real time of seeding: the other seeds submit the cases just before, and a signature
      // dated before its submission would contradict the audit trail.
      { checkPassword: false, notify: notices !== null },
    );
    out[name] = signed.report.id;
    if (name !== 'corrected') continue;

    const material = await loadReportMaterial(caseId);
    const corrected = await correctReport(
      sequelize,
      notices,
      actor,
      caseId,
      {
        password: '',
        reason:
          'Version 1 left out that the biopsy reached the laboratory four hours after collection, which the referring team reported afterwards (demo).',
        changesSummary: 'A sentence on the time from biopsy to freezing was added to the interpretation; no result changed (demo).',
        interpretation: `${proposalFor(material)}\n\nThe biopsy was frozen about four hours after collection (reported by the referring team after version 1). Delayed freezing can lower complex I and complex IV activities, so low values in this specimen are read with caution (demo wording).`,
        version: signed.caseVersion,
      },
      { checkPassword: false, notify: notices !== null },
    );
    out[name] = corrected.report.id;
  }
  return out;
}
