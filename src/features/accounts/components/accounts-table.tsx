import { useQuery } from '@tanstack/react-query';
import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { Button } from '@/components/ui/button';
import { DataTable, type DataTableClasses } from '@/components/ui/data-table';
import { Loading, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { roles, type Role } from '@/schemas/common';
import { passwordSchema, type UserAccount } from '@/schemas/user';
import { accountQueries } from '../api/account-queries';
import { useResetPassword, useUpdateAccount } from '../api/change-account';
import { roleLabels } from './role-labels';

const col = createColumnHelper<UserAccount>();

const accountTableClasses: DataTableClasses = {
  head: 'border-b border-paper-line text-ink-soft',
  headerCell: 'py-2 pr-3 font-medium',
  sortButton: 'hover:text-matrix-700',
  row: 'border-b border-paper-line/70 align-middle',
  cell: 'py-2 pr-3',
};

function AccountActions({ account, onMessage }: { account: UserAccount; onMessage: (tone: 'error' | 'success', text: string) => void }) {
  const update = useUpdateAccount();
  const reset = useResetPassword();
  const [resetting, setResetting] = useState(false);
  const [password, setPassword] = useState('');
  const [resetError, setResetError] = useState<string | null>(null);
  const fail = (err: unknown) => onMessage('error', err instanceof ApiError ? err.message : 'The change was not saved');

  return (
    <div className="flex flex-wrap items-center gap-2">
      <label className="sr-only" htmlFor={`role-${account.id}`}>
        Role of {account.name}
      </label>
      <select
        id={`role-${account.id}`}
        className="rounded border border-paper-line bg-paper-raised px-1.5 py-1 text-sm"
        value={account.role}
        onChange={(e) =>
          update.mutate(
            { id: account.id, input: { role: e.target.value as Role, version: account.version } },
            { onSuccess: (a) => onMessage('success', `${a.name} is now ${roleLabels[a.role].toLowerCase()}.`), onError: fail },
          )
        }
      >
        {roles.map((r) => (
          <option key={r} value={r}>
            {roleLabels[r]}
          </option>
        ))}
      </select>
      <Button
        variant="secondary"
        onClick={() =>
          update.mutate(
            { id: account.id, input: { active: !account.active, version: account.version } },
            { onSuccess: (a) => onMessage('success', `${a.name} ${a.active ? 'can sign in again' : 'can no longer sign in'}.`), onError: fail },
          )
        }
      >
        {account.active ? 'Deactivate' : 'Reactivate'}
      </Button>
      {resetting ? (
        <form
          className="flex items-center gap-1"
          onSubmit={(e) => {
            e.preventDefault();
            const parsed = passwordSchema.safeParse(password);
            if (!parsed.success) return setResetError(parsed.error.issues[0]?.message ?? 'Not a valid password');
            reset.mutate(
              { id: account.id, input: { password } },
              {
                onSuccess: () => {
                  setResetting(false);
                  setPassword('');
                  setResetError(null);
                  onMessage(
                    'success',
                    `Temporary password set for ${account.name}. Their open sessions have ended; at the next sign-in they choose their own password. Any lock-out is lifted.`,
                  );
                },
                onError: fail,
              },
            );
          }}
        >
          <label className="sr-only" htmlFor={`pw-${account.id}`}>
            Temporary password for {account.name}
          </label>
          <input
            id={`pw-${account.id}`}
            type="password"
            autoComplete="new-password"
            className="w-40 rounded border border-paper-line px-1.5 py-1 text-sm"
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            aria-invalid={resetError ? true : undefined}
          />
          <Button type="submit" variant="quiet">
            Set
          </Button>
          {resetError ? <span className="text-xs text-below">{resetError}</span> : null}
        </form>
      ) : (
        <Button variant="quiet" onClick={() => setResetting(true)}>
          Reset password
        </Button>
      )}
    </div>
  );
}

export function AccountsTable() {
  const { data, isPending, error } = useQuery(accountQueries.list());
  const [sorting, setSorting] = useState<SortingState>([{ id: 'name', desc: false }]);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);

  const columns = useMemo(
    () => [
      col.accessor('name', { header: 'Name' }),
      col.accessor('email', { header: 'E-mail' }),
      col.accessor('title', { header: 'Title', cell: (c) => c.getValue() ?? '—' }),
      col.accessor((a) => (!a.active ? 'Deactivated' : a.lockedUntil && new Date(a.lockedUntil) > new Date() ? 'Locked out' : a.mustChangePassword ? 'Active, temporary password' : 'Active'), {
        id: 'status',
        header: 'Status',
      }),
      col.display({
        id: 'actions',
        header: 'Role and access',
        cell: (c) => <AccountActions account={c.row.original} onMessage={(tone, text) => setMessage({ tone, text })} />,
      }),
    ],
    [],
  );
  const table = useReactTable({
    data: data ?? [],
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });

  if (isPending) return <Loading what="Loading accounts" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-3">
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <DataTable
        label="Accounts"
        table={table}
        classes={accountTableClasses}
        sortIndicator={(sorted) => (sorted ? { asc: ' ↑', desc: ' ↓' }[sorted] : '')}
      />
    </div>
  );
}
