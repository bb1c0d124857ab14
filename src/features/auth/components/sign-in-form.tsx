import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useZodForm } from '@/lib/form';
import { loginInputSchema, type User } from '@/schemas/user';
import { useSignIn } from '../api/sign-in';

export function SignInForm({ onSignedIn }: { onSignedIn: (user: User) => void }) {
  const form = useZodForm(loginInputSchema, { defaultValues: { email: '', password: '' } });
  const [formError, setFormError] = useState<string | null>(null);
  const signIn = useSignIn({ onDone: onSignedIn });
  const { errors } = form.formState;

  return (
    <form
      noValidate
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit((values) => {
        setFormError(null);
        signIn.mutate(values, { onError: (err) => setFormError(applyServerError(form, err)) });
      })}
    >
      <TextField label="E-mail address" type="email" autoComplete="username" registration={form.register('email')} error={errors.email?.message} />
      <TextField label="Password" type="password" autoComplete="current-password" registration={form.register('password')} error={errors.password?.message} />
      {formError ? <Notice tone="error">{formError}</Notice> : null}
      <Button type="submit" disabled={signIn.isPending}>
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
