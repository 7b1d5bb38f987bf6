'use client';

import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type SortingState,
} from '@tanstack/react-table';
import { ROLES, ROLE_LABELS, type Role } from '@/lib/vocabulary/roles';
import { endSessions, patchAccess } from './access-client';
import { utcMinute } from './format';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

export type PersonView = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  lastSignInAt: string | null;
  memberships: { studyId: number; studyName: string; studyRole: string }[];
};

const col = createColumnHelper<PersonView>();

/** The facility's accounts: sortable, filterable, with role changes and (de)activation. */
export function PeopleTable({ people, currentUserId }: { people: PersonView[]; currentUserId: number }) {
  const router = useRouter();
  const [sorting, setSorting] = useState<SortingState>([{ id: 'name', desc: false }]);
  const [globalFilter, setGlobalFilter] = useState('');
  const [columnFilters, setColumnFilters] = useState<ColumnFiltersState>([]);
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState<number | null>(null);

  async function change(person: PersonView, change: { role?: Role; active?: boolean }) {
    setBusy(person.id);
    setMessage(null);
    const result = await patchAccess(person.id, change);
    setBusy(null);
    if (!result.ok) return setMessage({ kind: 'error', text: result.message });
    const what = change.role
      ? `${person.name} is now ${ROLE_LABELS[change.role].toLowerCase()}.`
      : change.active
        ? `${person.name} is active again.`
        : `${person.name} is deactivated; their sessions stop working now.`;
    setMessage({ kind: 'ok', text: what });
    router.refresh();
  }

  async function signOutEverywhere(person: PersonView) {
    setBusy(person.id);
    setMessage(null);
    const result = await endSessions(person.id);
    setBusy(null);
    if (!result.ok) return setMessage({ kind: 'error', text: result.message });
    setMessage({ kind: 'ok', text: `${person.name} is signed out everywhere; their open sessions stop working now.` });
    if (person.id === currentUserId) router.push('/sign-in');
  }

  const columns = useMemo(
    () => [
      col.accessor('name', { header: 'Name', cell: (c) => <span className="text-ink">{c.getValue()}</span> }),
      col.accessor('email', { header: 'E-mail', cell: (c) => <span className="text-ink-muted">{c.getValue()}</span> }),
      col.accessor('role', {
        header: 'Role',
        filterFn: 'equalsString',
        cell: (c) => {
          const p = c.row.original;
          return (
            <select
              aria-label={`Role of ${p.name}`}
              data-testid={`role-${p.email}`}
              className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-sm"
              value={p.role}
              disabled={busy === p.id}
              onChange={(e) => change(p, { role: e.target.value as Role })}
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
          );
        },
      }),
      col.accessor((p) => (p.active ? 'active' : 'deactivated'), {
        id: 'status',
        header: 'Status',
        filterFn: 'equalsString',
        cell: (c) => (
          <span className={c.getValue() === 'active' ? 'text-ink' : 'text-alarm'} data-testid={`status-${c.row.original.email}`}>
            {c.getValue()}
          </span>
        ),
      }),
      col.accessor('lastSignInAt', {
        header: 'Last sign-in (UTC)',
        sortingFn: 'datetime',
        sortUndefined: 'last',
        cell: (c) => <span className="tabular-nums text-ink-muted">{utcMinute(c.getValue())}</span>,
      }),
      col.accessor((p) => p.memberships.map((m) => `${m.studyName} (${m.studyRole})`).join(', '), {
        id: 'studies',
        header: 'Studies',
        enableSorting: false,
        cell: (c) => <span className="text-ink-muted">{c.getValue() || '—'}</span>,
      }),
      col.display({
        id: 'actions',
        header: '',
        cell: (c) => {
          const p = c.row.original;
          return p.active ? (
            <span className="flex gap-2">
              <Button
                variant="quiet"
                data-testid={`sign-out-everywhere-${p.email}`}
                disabled={busy === p.id}
                onClick={() => signOutEverywhere(p)}
              >
                Sign out everywhere
              </Button>
              <Button
                variant="danger"
                data-testid={`deactivate-${p.email}`}
                disabled={busy === p.id}
                onClick={() => change(p, { active: false })}
              >
                {p.id === currentUserId ? 'Deactivate me' : 'Deactivate'}
              </Button>
            </span>
          ) : (
            <Button
              variant="quiet"
              data-testid={`reactivate-${p.email}`}
              disabled={busy === p.id}
              onClick={() => change(p, { active: true })}
            >
              Reactivate
            </Button>
          );
        },
      }),
    ],
    // eslint-disable-next-line react-hooks/exhaustive-deps -- `change` is a new function each render but only reads state through its arguments and the router
    [busy, currentUserId],
  );

  const table = useReactTable({
    data: people,
    columns,
    state: { sorting, globalFilter, columnFilters },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    onColumnFiltersChange: setColumnFilters,
    globalFilterFn: 'includesString',
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  const roleFilter = (table.getColumn('role')?.getFilterValue() as string) ?? '';
  const statusFilter = (table.getColumn('status')?.getFilterValue() as string) ?? '';

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3 text-sm">
        <label className="flex flex-col gap-1">
          <span className="text-ink-muted">Search</span>
          <input
            data-testid="people-search"
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
            placeholder="Name or e-mail"
            value={globalFilter}
            onChange={(e) => setGlobalFilter(e.target.value)}
          />
        </label>
        <label className="flex flex-col gap-1">
          <span className="text-ink-muted">Role</span>
          <select
            data-testid="people-role-filter"
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
            value={roleFilter}
            onChange={(e) => table.getColumn('role')?.setFilterValue(e.target.value || undefined)}
          >
            <option value="">Any</option>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1">
          <span className="text-ink-muted">Status</span>
          <select
            data-testid="people-status-filter"
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
            value={statusFilter}
            onChange={(e) => table.getColumn('status')?.setFilterValue(e.target.value || undefined)}
          >
            <option value="">Any</option>
            <option value="active">Active</option>
            <option value="deactivated">Deactivated</option>
          </select>
        </label>
        <span className="ml-auto text-ink-faint">
          {table.getRowModel().rows.length} of {people.length}
        </span>
      </div>
      {message ? (
        <Notice kind={message.kind} testId={message.kind === 'error' ? 'people-error' : 'people-ok'}>
          {message.text}
        </Notice>
      ) : null}
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="users-table">
          <thead className="text-xs text-ink-faint">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      className="py-1 pr-3 font-medium"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                    >
                      {h.column.getCanSort() ? (
                        <button type="button" className="hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          {sorted === 'asc' ? ' ↑' : sorted === 'desc' ? ' ↓' : ''}
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-line">
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} data-testid={`person-${row.original.email}`}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="py-1.5 pr-3 align-middle">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
