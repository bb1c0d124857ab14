import { useState } from 'react';
import { Card, Notice, PageHeader } from '@/components/ui/layout';
import { ChangePasswordForm } from '@/features/auth/components/change-password-form';

export default function ChangePasswordPage() {
  const [done, setDone] = useState(false);
  return (
    <>
      <PageHeader
        title="Your password"
        lead="Type your current password, then the new one. Anywhere else you are signed in with this account will be signed out."
      />
      <Card>
        {done ? (
          <div className="mb-4">
            <Notice tone="success">Your new password is saved. Other places where you were signed in have been signed out.</Notice>
          </div>
        ) : null}
        <ChangePasswordForm onChanged={() => setDone(true)} />
      </Card>
    </>
  );
}
