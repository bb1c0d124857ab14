import { useFieldArray, useForm } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { sexes } from '@/schemas/case';
import { assayCodes, specimenTypeLabels, specimenTypes } from '@/schemas/common';
import { ageBands, cohortComplexes, cohortPatternLabels, cohortPatterns, MAX_RANGES, type CohortCriteria } from '@/schemas/registry';
import { reportSexLabels } from '@/schemas/report-document';
import { cohortFormResolver, emptyRange, formValuesOf, type CohortFormValues } from '../utils/cohort-params';

const any = (label: string) => [{ value: '', label }];
const measureWords = { activity: 'activity', ratio_cs: 'ratio to CS', ratio_cii: 'ratio to CII' } as const;
const small = 'rounded-md border border-paper-line bg-paper-raised px-2 py-1.5 text-sm text-ink aria-[invalid=true]:border-below';

/**
 * The cohort criteria. The form's values become the same query string the server reads and are checked with
 * the shared cohort filter schema before anything is sent; messages stand beside their controls.
 */
export function CohortFilterForm({ initial, onSearch }: { initial: CohortCriteria; onSearch: (criteria: CohortCriteria) => void }) {
  const form = useForm<CohortFormValues, unknown, CohortCriteria>({ defaultValues: formValuesOf(initial), resolver: cohortFormResolver });
  const { register, control, handleSubmit, reset, formState } = form;
  const ranges = useFieldArray({ control, name: 'ranges' });
  const e = formState.errors;

  return (
    <form
      aria-label="Cohort criteria"
      noValidate
      className="flex flex-col gap-4"
      onSubmit={handleSubmit((criteria) => onSearch(criteria))}
    >
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <SelectField label="Pattern" registration={register('pattern')} error={e.pattern?.message}
          options={[...any('Any pattern'), ...cohortPatterns.map((p) => ({ value: p, label: cohortPatternLabels[p] }))]} />
        <SelectField label="Deficient complex" registration={register('complex')} error={e.complex?.message}
          hint="Named by an isolated, combined or linked finding"
          options={[...any('Any or none'), ...cohortComplexes.map((c) => ({ value: c, label: `Complex ${c.replace(/^C/, '')}` }))]} />
        <SelectField label="Specimen type" registration={register('specimenType')} error={e.specimenType?.message}
          options={[...any('Any specimen'), ...specimenTypes.map((t) => ({ value: t, label: specimenTypeLabels[t] }))]} />
        <SelectField label="Age at collection" registration={register('ageBand')} error={e.ageBand?.message}
          options={[...any('Any age'), ...Object.entries(ageBands).map(([value, b]) => ({ value, label: b.label }))]} />
        <SelectField label="Sex" registration={register('sex')} error={e.sex?.message}
          options={[...any('Any'), ...sexes.map((s) => ({ value: s, label: reportSexLabels[s] }))]} />
        <TextField label="Signed from (report date)" type="date" registration={register('signedFrom')} error={e.signedFrom?.message} />
        <TextField label="Signed to (report date)" type="date" registration={register('signedTo')} error={e.signedTo?.message} />
      </div>

      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium text-ink-soft">Value ranges (every row must hold)</legend>
        {ranges.fields.length === 0 ? <p className="text-xs text-ink-faint">No range conditions. Add one to narrow by an activity or ratio.</p> : null}
        {ranges.fields.map((field, i) => {
          const re = e.ranges?.[i];
          const message = re?.assay?.message ?? re?.measure?.message ?? re?.scale?.message ?? re?.min?.message ?? re?.max?.message;
          const n = i + 1;
          return (
            <div key={field.id} className="flex flex-wrap items-end gap-2 rounded-md border border-paper-line/70 bg-paper-sunk/40 p-2">
              <label className="flex flex-col text-xs text-ink-soft">
                Assay
                <select aria-label={`Range ${n} assay`} className={small} aria-invalid={re?.assay ? true : undefined} {...register(`ranges.${i}.assay`)}>
                  {assayCodes.map((a) => <option key={a} value={a}>{a}</option>)}
                </select>
              </label>
              <label className="flex flex-col text-xs text-ink-soft">
                Measure
                <select aria-label={`Range ${n} measure`} className={small} aria-invalid={re?.measure ? true : undefined} {...register(`ranges.${i}.measure`)}>
                  {Object.entries(measureWords).map(([v, w]) => <option key={v} value={v}>{w}</option>)}
                </select>
              </label>
              <label className="flex flex-col text-xs text-ink-soft">
                As
                <select aria-label={`Range ${n} scale`} className={small} {...register(`ranges.${i}.scale`)}>
                  <option value="pct">% of reference mean</option>
                  <option value="value">value</option>
                </select>
              </label>
              <label className="flex flex-col text-xs text-ink-soft">
                From
                <input aria-label={`Range ${n} lowest`} inputMode="decimal" className={`${small} w-24`} aria-invalid={re?.min ? true : undefined} {...register(`ranges.${i}.min`)} />
              </label>
              <label className="flex flex-col text-xs text-ink-soft">
                To
                <input aria-label={`Range ${n} highest`} inputMode="decimal" className={`${small} w-24`} aria-invalid={re?.max ? true : undefined} {...register(`ranges.${i}.max`)} />
              </label>
              <Button variant="quiet" onClick={() => ranges.remove(i)} aria-label={`Remove range ${n}`}>Remove</Button>
              {message ? <p role="alert" className="basis-full text-xs font-medium text-below">Range {n}: {message}</p> : null}
            </div>
          );
        })}
        <div>
          <Button variant="secondary" onClick={() => ranges.append({ ...emptyRange })} disabled={ranges.fields.length >= MAX_RANGES}>
            Add a range
          </Button>
        </div>
      </fieldset>

      <div className="flex flex-wrap gap-2">
        <Button type="submit">Find cases</Button>
        <Button variant="quiet" onClick={() => { reset(formValuesOf({})); onSearch({}); }}>Clear all criteria</Button>
      </div>
    </form>
  );
}
