import { FormFooter } from '@/components/ui/form-footer';
import { useState } from 'react';
import { SelectField, TextArea, TextField } from '@/components/ui/field';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import {
  absorbanceDirections,
  backgroundKinds,
  createAssayDefinitionVersionInputSchema,
  rateModels,
  type AssayDefinition,
} from '@/schemas/assay';
import { useCreateDefinitionVersion } from '../api/definition-queries';

const num = { valueAsNumber: true } as const;

/**
 * Saves the edited definition as a draft of the next version; calculations keep the version in force until a
 * second director approves the draft. Results already stored keep the version they used.
 */
export function DefinitionEditor({ definition, onDone }: { definition: AssayDefinition; onDone: () => void }) {
  const { code, version, ...fields } = definition;
  const form = useZodForm(createAssayDefinitionVersionInputSchema, {
    defaultValues: { definition: fields, changeNote: '', basedOnVersion: version },
  });
  const save = useCreateDefinitionVersion(code);
  const [formError, setFormError] = useState<string | null>(null);
  const e = form.formState.errors.definition;
  useUnsavedChangesPrompt(form.formState.isDirty && !save.isSuccess);
  const reg = (name: keyof typeof fields, numeric = false) =>
    form.register(`definition.${name}` as const, numeric ? num : undefined);

  return (
    <form
      noValidate
      className="grid gap-3 sm:grid-cols-3"
      onSubmit={form.handleSubmit((values) => {
        setFormError(null);
        save.mutate(values, { onSuccess: onDone, onError: (err) => setFormError(applyServerError(form, err)) });
      })}
    >
      <div className="sm:col-span-3">
        <TextField label="Name" registration={reg('name')} error={e?.name?.message} />
      </div>
      <TextField label="Wavelength (nm)" inputMode="decimal" registration={reg('wavelengthNm', true)} error={e?.wavelengthNm?.message} />
      <TextField label="Chromophore" registration={reg('chromophore')} error={e?.chromophore?.message} />
      <TextField label="ε (mM⁻¹·cm⁻¹)" inputMode="decimal" registration={reg('epsilonPerMmPerCm', true)} error={e?.epsilonPerMmPerCm?.message} />
      <div className="sm:col-span-3">
        <TextArea label="Source of ε" registration={reg('epsilonSource')} error={e?.epsilonSource?.message} />
      </div>
      <SelectField label="Absorbance during the reaction" registration={reg('direction')} options={absorbanceDirections.map((d) => ({ value: d, label: d }))} />
      <SelectField label="Background subtracted" registration={reg('background')} options={backgroundKinds.map((b) => ({ value: b, label: b }))} />
      <TextField label="Background note" registration={reg('backgroundNote')} error={e?.backgroundNote?.message} />
      <SelectField label="Rate model" registration={reg('rateModel')} error={e?.rateModel?.message} options={rateModels.map((m) => ({ value: m, label: m === 'linear' ? 'linear rate' : 'first-order (complex IV only)' }))} />
      <TextField label="r² below which a fit is flagged" inputMode="decimal" registration={reg('r2Threshold', true)} error={e?.r2Threshold?.message} />
      <TextField label="Fewest readings in a window" inputMode="numeric" registration={reg('minPoints', true)} error={e?.minPoints?.message} />
      <TextField label="Linear range, lowest A" inputMode="decimal" registration={reg('linearRangeMin', true)} error={e?.linearRangeMin?.message} />
      <TextField label="Linear range, highest A" inputMode="decimal" registration={reg('linearRangeMax', true)} error={e?.linearRangeMax?.message} />
      <TextField label="Near-zero slope (A/min)" inputMode="decimal" registration={reg('nearZeroSlopePerMin', true)} error={e?.nearZeroSlopePerMin?.message} />
      <TextField label="Replicate CV limit (%)" inputMode="decimal" registration={reg('cvLimitPct', true)} error={e?.cvLimitPct?.message} />
      <TextField label="Curvature limit (% change across a window)" inputMode="decimal" registration={reg('curvatureLimitPct', true)} error={e?.curvatureLimitPct?.message} />
      <TextField label="Latest start of the automatic window (s)" inputMode="decimal" registration={reg('lagMaxS', true)} error={e?.lagMaxS?.message} />
      <TextField label="Stray reading limit (× scatter)" inputMode="decimal" registration={reg('outlierLimitSd', true)} error={e?.outlierLimitSd?.message} />
      <TextField label="Reading noise of the instrument (A)" inputMode="decimal" registration={reg('readingNoiseFloor', true)} error={e?.readingNoiseFloor?.message} />
      <TextField label="Background share limit (% of total rate)" inputMode="decimal" registration={reg('maxBackgroundPct', true)} error={e?.maxBackgroundPct?.message} />
      <TextField label="Blank share limit (% of total rate)" inputMode="decimal" registration={reg('maxBlankPct', true)} error={e?.maxBlankPct?.message} />
      <TextField label="Plausible activity ceiling (nmol/min/mg)" inputMode="decimal" registration={reg('plausibleActivityMax', true)} error={e?.plausibleActivityMax?.message} />
      <div className="sm:col-span-3">
        <TextArea label="What changed and why" registration={form.register('changeNote')} error={form.formState.errors.changeNote?.message} />
      </div>
      <FormFooter error={formError} saving={save.isPending} saveLabel="Save as a draft for a second director" onCancel={onDone} columns={3} />
    </form>
  );
}
