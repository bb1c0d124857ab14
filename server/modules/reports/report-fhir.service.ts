import type { User } from '@/schemas/user';
import { buildReportBundle } from '../../domain/fhir-report/build-fhir-bundle';
import { getReportPdfFor } from './reports.service';

/**
 * GET /api/reports/:id/fhir: the signed version as an HL7 FHIR R4 Bundle. Read through the PDF's own
 * access check, so exactly the PDF's readers get it (another clinician's report is a 404 like a missing one).
 */
export async function getReportFhirFor(user: User, id: number): Promise<{ bundle: Record<string, unknown>; filename: string }> {
  const { pdf, filename, report } = await getReportPdfFor(user, id);
  const bundle = buildReportBundle({
    reportId: report.id,
    document: report.document,
    reportedSpecimenLabel: report.specimenLabel,
    pdf,
    pdfFilename: filename,
  });
  return { bundle, filename: filename.replace(/\.pdf$/, '.fhir.json') };
}
