import { useQuery } from '@tanstack/react-query';
import { SelectField, TextArea } from '@/components/ui/field';
import { useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { updateCaseInputSchema, type CaseDetail } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { useUpdateCase } from '../api/update-case';
import { PriorityField } from './priority-field';
import { VersionedCaseForm } from './versioned-case-form';

/** Corrects the referral facts. Mount it with key={detail.version} so a reload starts from the latest. */
export function EditCaseForm({ detail, onDone, onReload }: { detail: CaseDetail; onDone: () => void; onReload: () => void }) {
  const clinicians = useQuery(caseQueries.clinicians());
  const update = useUpdateCase(detail.id);
  const form = useZodForm(updateCaseInputSchema, {
    defaultValues: {
      referringClinicianId: detail.referringClinician.id,
      clinicalIndication: detail.clinicalIndication,
      priority: detail.priority,
      version: detail.version,
    },
  });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !update.isSuccess);
  const options = (clinicians.data ?? []).map((c) => ({ value: String(c.id), label: c.name }));
  if (!options.some((o) => o.value === String(detail.referringClinician.id))) {
    options.unshift({ value: String(detail.referringClinician.id), label: `${detail.referringClinician.name} (no longer active)` });
  }

  return (
    <VersionedCaseForm
      form={form}
      mutation={update}
      label="Change case details"
      className="flex flex-col gap-4 rounded-md border border-matrix-200 bg-matrix-50/50 p-4"
      submitLabel="Save changes"
      pendingLabel="Saving…"
      discardLabel="Discard"
      onDone={onDone}
      onReload={onReload}
    >
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          label="Referring clinician"
          registration={form.register('referringClinicianId', { setValueAs: (v: string) => (v === '' ? undefined : Number(v)) })}
          error={errors.referringClinicianId?.message}
          options={options}
        />
        <PriorityField registration={form.register('priority')} />
        <div className="sm:col-span-2">
          <TextArea label="Clinical indication" registration={form.register('clinicalIndication')} error={errors.clinicalIndication?.message} />
        </div>
      </div>
    </VersionedCaseForm>
  );
}
