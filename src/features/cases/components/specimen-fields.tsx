import { useQuery } from '@tanstack/react-query';
import { Controller, type FieldErrors, type FieldValues, type Path, type UseFormReturn } from 'react-hook-form';
import { SelectField, TextField } from '@/components/ui/field';
import { specimenTypeLabels, specimenTypes } from '@/schemas/common';
import { transportConditionLabels, transportConditions, type ReceiveSpecimenInput } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { toLabInputValue, zoneAbbreviation } from '../utils/lab-time';
import { ReasonPicker } from './reason-picker';

const emptyToNull = (v: unknown) => (v === '' || v === undefined ? null : v);
const toWeight = (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v));

/** A new specimen's starting values: received now (lab time), accepted, nothing else filled in. */
export function arrivingSpecimenDefaults(timeZone: string): ReceiveSpecimenInput {
  return {
    type: 'skeletal_muscle',
    source: '',
    collectedAt: null,
    receivedAt: toLabInputValue(new Date(), timeZone),
    transportCondition: 'dry_ice',
    wetWeightMg: null,
    accepted: true,
    rejectionReason: null,
  };
}

/**
 * The fields of a specimen as it arrives, for any form that holds a ReceiveSpecimenInput at `prefix`
 * ("specimen." inside the registration form, "" on its own).
 */
export function SpecimenFields<T extends FieldValues>({
  form,
  prefix,
  timeZone,
}: {
  form: UseFormReturn<T, unknown, FieldValues>;
  prefix: '' | 'specimen.';
  timeZone: string;
}) {
  const reasons = useQuery(caseQueries.rejectionReasons());
  const name = (field: keyof ReceiveSpecimenInput) => `${prefix}${field}` as Path<T>;
  const all = form.formState.errors as FieldErrors;
  const errors = (prefix ? all.specimen : all) as FieldErrors<ReceiveSpecimenInput> | undefined;
  const zone = zoneAbbreviation(timeZone);
  const accepted = form.watch(name('accepted')) as unknown as boolean;

  return (
    <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
      <SelectField
        label="Specimen type"
        registration={form.register(name('type'))}
        error={errors?.type?.message}
        options={specimenTypes.map((t) => ({ value: t, label: specimenTypeLabels[t] }))}
      />
      <TextField
        label="Source (site, procedure)"
        placeholder="e.g. Vastus lateralis, needle biopsy"
        registration={form.register(name('source'))}
        error={errors?.source?.message}
      />
      <TextField
        label="Wet weight (mg)"
        type="number"
        inputMode="decimal"
        step="any"
        min="0"
        hint="Leave empty for cultured cells."
        registration={form.register(name('wetWeightMg'), { setValueAs: toWeight })}
        error={errors?.wetWeightMg?.message}
      />
      <TextField
        label={`Collected (${zone}, optional)`}
        type="datetime-local"
        registration={form.register(name('collectedAt'), { setValueAs: emptyToNull })}
        error={errors?.collectedAt?.message}
      />
      <TextField
        label={`Received in the laboratory (${zone})`}
        type="datetime-local"
        registration={form.register(name('receivedAt'))}
        error={errors?.receivedAt?.message}
      />
      <SelectField
        label="Condition on arrival"
        registration={form.register(name('transportCondition'))}
        error={errors?.transportCondition?.message}
        options={transportConditions.map((t) => ({ value: t, label: transportConditionLabels[t] }))}
      />
      <Controller
        control={form.control}
        name={name('accepted')}
        render={({ field }) => (
          <fieldset className="flex flex-col gap-1 sm:col-span-1">
            <legend className="mb-1 text-sm font-medium text-ink-soft">On receipt</legend>
            <div className="flex gap-4 text-sm">
              <label className="inline-flex items-center gap-1.5">
                <input type="radio" name={field.name} checked={field.value === true} onChange={() => field.onChange(true)} onBlur={field.onBlur} />
                Accepted
              </label>
              <label className="inline-flex items-center gap-1.5">
                <input type="radio" name={field.name} checked={field.value === false} onChange={() => field.onChange(false)} onBlur={field.onBlur} />
                Rejected
              </label>
            </div>
          </fieldset>
        )}
      />
      {accepted === false ? (
        <div className="sm:col-span-2">
          <Controller
            control={form.control}
            name={name('rejectionReason')}
            render={({ field }) => (
              <ReasonPicker
                reasons={reasons.data ?? []}
                value={(field.value as string | null) ?? null}
                onChange={field.onChange}
                error={errors?.rejectionReason?.message}
              />
            )}
          />
        </div>
      ) : null}
    </div>
  );
}
