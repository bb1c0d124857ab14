import type { UseFormRegisterReturn } from 'react-hook-form';
import { SelectField, TextField } from '@/components/ui/field';
import { sexes } from '@/schemas/case';
import { sexLabels } from '../utils/patient-text';

type FieldName = 'labPatientId' | 'familyName' | 'givenName' | 'dateOfBirth' | 'sex';

/** The patient's own fields, shared by registration and correction (both forms use the shared schemas). */
export function PatientFields({
  register,
  errors,
  className,
}: {
  register: (name: FieldName) => UseFormRegisterReturn;
  errors: Partial<Record<FieldName, { message?: string }>>;
  className: string;
}) {
  return (
    <div className={className}>
      <TextField label="Lab patient ID" autoComplete="off" registration={register('labPatientId')} error={errors.labPatientId?.message} />
      <TextField label="Family name" autoComplete="off" registration={register('familyName')} error={errors.familyName?.message} />
      <TextField label="Given name(s)" autoComplete="off" registration={register('givenName')} error={errors.givenName?.message} />
      <TextField label="Date of birth" type="date" registration={register('dateOfBirth')} error={errors.dateOfBirth?.message} />
      <SelectField
        label="Sex"
        registration={register('sex')}
        error={errors.sex?.message}
        options={sexes.map((s) => ({ value: s, label: sexLabels[s] }))}
      />
    </div>
  );
}
