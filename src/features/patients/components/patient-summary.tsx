import type { Patient } from '@/schemas/case';
import { ageOn, sexLabels } from '../utils/patient-text';

/** One patient in a line or two: name, lab ID, date of birth with age, and sex. */
export function PatientSummary({ patient, className = '' }: { patient: Patient; className?: string }) {
  return (
    <div className={className}>
      <p className="font-semibold text-matrix-900">
        {patient.familyName}, {patient.givenName}
      </p>
      <p className="text-sm text-ink-soft">
        <span className="font-mono">{patient.labPatientId}</span>
        <span aria-hidden="true"> · </span>
        born <span className="num">{patient.dateOfBirth}</span> ({ageOn(patient.dateOfBirth)})
        <span aria-hidden="true"> · </span>
        {sexLabels[patient.sex]}
      </p>
    </div>
  );
}
