import { Card, PageHeader } from '@/components/ui/layout';
import { AccountsTable } from '@/features/accounts/components/accounts-table';
import { CreateAccountForm } from '@/features/accounts/components/create-account-form';

export default function AccountsPage() {
  return (
    <>
      <PageHeader
        title="Accounts"
        lead="Who can sign in to Cristae and with which role. Deactivating an account ends its sessions; every change is kept in the audit trail."
      />
      <div className="flex flex-col gap-6">
        <Card title="People with access">
          <AccountsTable />
        </Card>
        <Card title="Add an account">
          <CreateAccountForm />
        </Card>
      </div>
    </>
  );
}
