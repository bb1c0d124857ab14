import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useZodForm } from '@/lib/form';
import { changePasswordInputSchema, passwordRule } from '@/schemas/user';
import { useChangePassword } from '../api/change-password';

/** Current password and a new one, checked by the same schema as the server. */
export function ChangePasswordForm({ onChanged, submitLabel = 'Change password' }: { onChanged: () => void; submitLabel?: string }) {
  const form = useZodForm(changePasswordInputSchema, { defaultValues: { currentPassword: '', newPassword: '' } });
  const [formError, setFormError] = useState<string | null>(null);
  const [visible, setVisible] = useState(false);
  const change = useChangePassword({
    onDone: () => {
      form.reset();
      onChanged();
    },
  });
  const { errors } = form.formState;
  const type = visible ? 'text' : 'password';

  return (
    <form
      noValidate
      className="flex max-w-sm flex-col gap-4"
      onSubmit={form.handleSubmit((values) => {
        setFormError(null);
        change.mutate(values, { onError: (err) => setFormError(applyServerError(form, err)) });
      })}
    >
      <TextField
        label="Current password"
        type={type}
        autoComplete="current-password"
        registration={form.register('currentPassword')}
        error={errors.currentPassword?.message}
      />
      <TextField
        label="New password"
        type={type}
        autoComplete="new-password"
        hint={passwordRule}
        registration={form.register('newPassword')}
        error={errors.newPassword?.message}
      />
      <label className="flex items-center gap-2 text-sm text-ink-soft">
        <input type="checkbox" checked={visible} onChange={(e) => setVisible(e.target.checked)} />
        Show what I type
      </label>
      {formError ? <Notice tone="error">{formError}</Notice> : null}
      <Button type="submit" disabled={change.isPending}>
        {change.isPending ? 'Saving…' : submitLabel}
      </Button>
    </form>
  );
}
