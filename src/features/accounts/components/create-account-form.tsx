import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { roles } from '@/schemas/common';
import { createUserInputSchema } from '@/schemas/user';
import { useCreateAccount } from '../api/change-account';
import { roleLabels } from './role-labels';

export function CreateAccountForm() {
  const form = useZodForm(createUserInputSchema, {
    defaultValues: { email: '', name: '', title: '', role: 'technologist', password: '' },
  });
  const create = useCreateAccount();
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty);

  return (
    <form
      noValidate
      className="grid gap-3 sm:grid-cols-2"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        create.mutate(values, {
          onSuccess: (account) => {
            form.reset();
            setMessage({ tone: 'success', text: `Account created for ${account.name} (${account.email}).` });
          },
          onError: (err) => {
            const text = applyServerError(form, err);
            if (text) setMessage({ tone: 'error', text });
          },
        });
      })}
    >
      <TextField label="Full name" registration={form.register('name')} error={errors.name?.message} />
      <TextField label="E-mail address" type="email" registration={form.register('email')} error={errors.email?.message} />
      <TextField label="Job title (optional)" registration={form.register('title')} error={errors.title?.message} />
      <SelectField
        label="Role"
        registration={form.register('role')}
        error={errors.role?.message}
        options={roles.map((r) => ({ value: r, label: roleLabels[r] }))}
      />
      <TextField
        label="First password"
        type="password"
        autoComplete="new-password"
        hint="At least 12 characters; tell the person through a separate channel. It works once: at the first sign-in they choose their own."
        registration={form.register('password')}
        error={errors.password?.message}
      />
      <div className="flex items-end">
        <Button type="submit" disabled={create.isPending}>
          {create.isPending ? 'Creating…' : 'Create account'}
        </Button>
      </div>
      {message ? (
        <div className="sm:col-span-2">
          <Notice tone={message.tone}>{message.text}</Notice>
        </div>
      ) : null}
    </form>
  );
}
