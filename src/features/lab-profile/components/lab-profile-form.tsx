import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { updateLabProfileInputSchema, type LabProfile } from '@/schemas/lab-profile';
import { useSaveLabProfile } from '../api/lab-profile';

/** Address lines are edited as one text box, a line each, and sent as the schema's array. */
export function LabProfileForm({ profile }: { profile: LabProfile }) {
  const form = useZodForm(updateLabProfileInputSchema, {
    defaultValues: {
      name: profile.name,
      addressLines: profile.addressLines,
      accreditationNumber: profile.accreditationNumber,
      phone: profile.phone,
      timeZone: profile.timeZone,
      allowSelfApproval: profile.allowSelfApproval,
      version: profile.version,
    },
  });
  const [address, setAddress] = useState(profile.addressLines.join('\n'));
  const save = useSaveLabProfile();
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !save.isSuccess);

  return (
    <form
      noValidate
      className="grid max-w-2xl gap-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        save.mutate(values, {
          onSuccess: (saved) => {
            form.reset({ ...saved });
            setMessage({ tone: 'success', text: 'Laboratory profile saved. New reports will print it.' });
          },
          onError: (err) => {
            const text = applyServerError(form, err);
            if (text) setMessage({ tone: 'error', text });
          },
        });
      })}
    >
      <TextField label="Laboratory name" registration={form.register('name')} error={errors.name?.message} />
      <TextArea
        label="Address (one line each)"
        value={address}
        onChange={(e) => {
          setAddress(e.target.value);
          form.setValue('addressLines', e.target.value.split('\n'), { shouldDirty: true, shouldValidate: true });
        }}
        error={errors.addressLines?.message ?? errors.addressLines?.find?.((x) => x?.message)?.message}
      />
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Accreditation number" registration={form.register('accreditationNumber')} error={errors.accreditationNumber?.message} />
        <TextField label="Telephone" registration={form.register('phone', { setValueAs: (v: string) => (v === '' ? null : v) })} error={errors.phone?.message} />
        <TextField
          label="Time zone (IANA)"
          registration={form.register('timeZone')}
          error={errors.timeZone?.message ?? (isDirty ? undefined : (profile.timeZoneNotice ?? undefined))}
        />
      </div>
      <fieldset className="grid gap-1 text-sm">
        <legend className="font-semibold text-ink">Who approves new versions</legend>
        <label className="flex items-start gap-2">
          <input type="checkbox" className="mt-1" {...form.register('allowSelfApproval')} />
          <span>
            This laboratory has a single director: let a director approve the reference intervals and assay definitions
            they drafted themselves.
          </span>
        </label>
        <p className="text-xs text-ink-soft">
          Left clear, a second director approves every new version. When a report uses a version its own author
          approved, its methods section says so. The change is kept in the audit trail.
        </p>
      </fieldset>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <div>
        <Button type="submit" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : 'Save profile'}
        </Button>
      </div>
    </form>
  );
}
