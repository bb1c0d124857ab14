import { Wordmark } from '@/components/ui/wordmark';
import { ChangePasswordForm } from '@/features/auth/components/change-password-form';
import { usePageTitle } from '@/hooks/use-page-title';

/**
 * Shown instead of every page while the account's password is one an administrator set: the person chooses
 * their own before anything else (the server refuses every other request with PASSWORD_CHANGE_REQUIRED).
 */
export function PasswordRequiredScreen({ name, onSignOut }: { name: string; onSignOut: () => void }) {
  usePageTitle('Choose your password');
  return (
    <div className="flex min-h-screen items-center justify-center bg-paper p-8">
      <div className="w-full max-w-md rounded-card border border-paper-line bg-paper-raised p-8 shadow-card">
        <Wordmark className="mb-6" />
        <h1 className="mb-2 text-xl font-semibold text-matrix-900">Choose your own password</h1>
        <p className="mb-6 text-sm text-ink-soft">
          {name}, an administrator set the password you just used. Before you continue, replace it with one only you
          know: it is also the password you type to sign reports.
        </p>
        <ChangePasswordForm onChanged={() => undefined} submitLabel="Save and continue" />
        <button type="button" className="mt-6 text-xs text-ink-soft underline hover:text-matrix-900" onClick={onSignOut}>
          Sign out instead
        </button>
      </div>
    </div>
  );
}
