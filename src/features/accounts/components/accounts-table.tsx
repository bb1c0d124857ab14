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
  // A role change or a deactivation waits for a second, deliberate click: both take effect at once for that person.
  const [pending, setPending] = useState<{ kind: 'role'; role: Role } | { kind: 'deactivate' } | null>(null);
  const fail = (err: unknown) => onMessage('error', err instanceof ApiError ? err.message : 'The change was not saved');
  const confirm = () => {
    if (!pending) return;
    const input = pending.kind === 'role' ? { role: pending.role, version: account.version } : { active: false, version: account.version };
    update.mutate(
      { id: account.id, input },
      {
        onSuccess: (a) =>
          onMessage('success', pending.kind === 'role' ? `${a.name} is now ${roleLabels[a.role].toLowerCase()}.` : `${a.name} can no longer sign in.`),
        onError: fail,
        onSettled: () => setPending(null),
      },
    );
  };

  return (
    <div className="flex flex-wrap items-center gap-2">
      <label className="sr-only" htmlFor={`role-${account.id}`}>
        Role of {account.name}
      </label>
      <select
        id={`role-${account.id}`}
        className="rounded border border-paper-line bg-paper-raised px-1.5 py-1 text-sm"
        value={pending?.kind === 'role' ? pending.role : account.role}
        onChange={(e) => {
          const role = e.target.value as Role;
          setPending(role === account.role ? null : { kind: 'role', role });
        }}
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
          account.active
            ? setPending({ kind: 'deactivate' })
            : update.mutate(
                { id: account.id, input: { active: true, version: account.version } },
                { onSuccess: (a) => onMessage('success', `${a.name} can sign in again.`), onError: fail },
              )
        }
      >
        {account.active ? 'Deactivate…' : 'Reactivate'}
      </Button>
      {pending ? (
        <div role="group" aria-label={`Confirm the change for ${account.name}`} className="flex basis-full flex-wrap items-center gap-2 rounded-md border border-caution-line bg-caution-bg px-2 py-1.5 text-sm text-caution">
          <span>
            {pending.kind === 'role'
              ? `Change the role of ${account.name} to ${roleLabels[pending.role]}? What they can open and do changes with it.`
              : `Deactivate ${account.name}? Their sessions end and they cannot sign in until the account is reactivated.`}
          </span>
          <Button variant={pending.kind === 'role' ? 'primary' : 'danger'} disabled={update.isPending} onClick={confirm}>
            {pending.kind === 'role' ? 'Change the role' : 'Deactivate'}
          </Button>
          <Button variant="quiet" onClick={() => setPending(null)}>
            Keep as it is
          </Button>
        </div>
      ) : null}
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
