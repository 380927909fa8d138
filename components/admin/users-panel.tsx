'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { apiFetch, ApiError } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { INVITE_ROLES, invitationInput, type InvitationFormValues, type InvitationInput } from '@/lib/fleet/invitations';
import { LocalTime } from '@/components/ui/local-time';

type Role = (typeof INVITE_ROLES)[number];
type UserRow = { id: string; name: string; email: string; role: Role; active: boolean };
type InvitationRow = { id: string; email: string; role: Role; expiresAt: string; invitedBy: string };

export const USERS_KEY = ['users'] as const;
export const INVITATIONS_KEY = ['invitations'] as const;

const roleLabel: Record<Role, string> = { technician: 'Technician', expert: 'Expert', reviewer: 'Reviewer', admin: 'Admin' };

function UserRowView({ user, isSelf }: { user: UserRow; isSelf: boolean }) {
  const queryClient = useQueryClient();
  const change = useMutation({
    mutationFn: (body: { role?: Role; active?: boolean }) => apiFetch<{ user: UserRow }>(`/api/users/${user.id}`, { method: 'PATCH', body }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: USERS_KEY }),
  });
  return (
    <tr className={`border-t border-rule ${user.active ? '' : 'bg-paper text-ink-soft'}`} data-email={user.email}>
      <td className="px-3 py-2 align-top">
        <span className="block font-semibold">
          {user.name}
          {isSelf && <span className="font-normal text-ink-soft"> (you)</span>}
        </span>
        <span className="block break-all text-sm">{user.email}</span>
      </td>
      <td className="px-3 py-2 align-top">
        <select
          aria-label={`Role of ${user.name}`}
          value={user.role}
          disabled={change.isPending || !user.active}
          onChange={(e) => change.mutate({ role: e.target.value as Role })}
          className="min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg disabled:opacity-60"
        >
          {INVITE_ROLES.map((r) => (
            <option key={r} value={r}>
              {roleLabel[r]}
            </option>
          ))}
        </select>
      </td>
      <td className="px-3 py-2 align-top">
        <span className={`rounded-full px-3 py-1 text-sm font-bold ${user.active ? 'bg-pass text-white' : 'bg-rule text-ink'}`}>{user.active ? 'Active' : 'Deactivated'}</span>
      </td>
      <td className="px-3 py-2 align-top">
        {!isSelf && (
          <Button tone="plain" type="button" disabled={change.isPending} onClick={() => change.mutate({ active: !user.active })} className="min-w-40">
            {user.active ? 'Deactivate' : 'Reactivate'}
          </Button>
        )}
        {change.error && (
          <p role="alert" className="mt-2 max-w-xs text-sm font-semibold text-fail">
            {change.error.message}
          </p>
        )}
      </td>
    </tr>
  );
}

function InviteForm() {
  const queryClient = useQueryClient();
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors },
  } = useForm<InvitationFormValues, unknown, InvitationInput>({ resolver: zodResolver(invitationInput), defaultValues: { email: '', role: 'technician' } });
  const invite = useMutation({
    mutationFn: (values: InvitationInput) => apiFetch<{ invitation: InvitationRow }>('/api/invitations', { method: 'POST', body: values }),
    onSuccess: async () => {
      reset({ email: '', role: 'technician' });
      await queryClient.invalidateQueries({ queryKey: INVITATIONS_KEY });
    },
    onError: (e) => {
      if (e instanceof ApiError && (e.field === 'email' || e.field === 'role')) setError(e.field, { message: e.message.replace(/^\w+: /, '') });
    },
  });
  const formError = invite.error && !(invite.error instanceof ApiError && invite.error.field) ? invite.error.message : null;
  return (
    <form onSubmit={handleSubmit((v) => invite.mutate(v))} noValidate className="grid gap-3 sm:grid-cols-[1fr_14rem_auto] sm:items-start">
      <FormField label="E-mail" error={errors.email?.message}>
        <input {...register('email')} type="email" autoComplete="off" className={inputClass} aria-invalid={Boolean(errors.email)} />
      </FormField>
      <FormField label="Role" error={errors.role?.message}>
        <select {...register('role')} className={inputClass}>
          {INVITE_ROLES.map((r) => (
            <option key={r} value={r}>
              {roleLabel[r]}
            </option>
          ))}
        </select>
      </FormField>
      <Button type="submit" disabled={invite.isPending} className="sm:mt-7">
        {invite.isPending ? 'Sending…' : 'Send invitation'}
      </Button>
      {formError && (
        <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail sm:col-span-3">
          {formError}
        </p>
      )}
      {invite.isSuccess && (
        <p role="status" className="font-semibold text-pass sm:col-span-3">
          Invitation sent to {invite.data.invitation.email}.
        </p>
      )}
    </form>
  );
}

/** The admin's page body: the organisation's people with role and active switches, the invite form and pending invitations. */
export function UsersPanel({ actorId }: { actorId: string }) {
  const users = useQuery({ queryKey: USERS_KEY, queryFn: () => apiFetch<{ users: UserRow[] }>('/api/users') });
  const invitations = useQuery({ queryKey: INVITATIONS_KEY, queryFn: () => apiFetch<{ invitations: InvitationRow[] }>('/api/invitations') });
  return (
    <div className="grid grid-cols-[minmax(0,1fr)] gap-8">
      <section aria-labelledby="people-h" className="grid grid-cols-[minmax(0,1fr)] gap-3">
        <h2 id="people-h" className="text-xl font-bold">
          People
        </h2>
        <p className="text-ink-soft">A deactivated person is signed out at once, live sessions included, and cannot sign in until reactivated.</p>
        {users.error && <p role="alert" className="font-semibold text-fail">{users.error.message}</p>}
        <div className="relative overflow-x-auto rounded-xl border-2 border-rule bg-card">
          <table className="w-full border-collapse text-left">
            <thead className="bg-steel text-paper">
              <tr>
                <th scope="col" className="px-3 py-2">Name and e-mail</th>
                <th scope="col" className="px-3 py-2">Role</th>
                <th scope="col" className="px-3 py-2">State</th>
                <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {users.data?.users.map((u) => <UserRowView key={u.id} user={u} isSelf={u.id === actorId} />)}
              {users.isPending && (
                <tr>
                  <td colSpan={4} className="px-3 py-6 text-center text-ink-soft">Loading…</td>
                </tr>
              )}
            </tbody>
          </table>
        </div>
      </section>

      <section aria-labelledby="invite-h" className="grid gap-3 rounded-xl border-2 border-rule bg-card p-4 sm:p-6">
        <h2 id="invite-h" className="text-xl font-bold">
          Invite someone
        </h2>
        <p className="text-ink-soft">They get an e-mail with a link that works once, for 7 days, to set their name and password.</p>
        <InviteForm />
      </section>

      <section aria-labelledby="pending-h" className="grid gap-3">
        <h2 id="pending-h" className="text-xl font-bold">
          Pending invitations
        </h2>
        {invitations.data && invitations.data.invitations.length === 0 && <p className="text-ink-soft">None waiting.</p>}
        <ul className="grid gap-2" data-testid="pending-invitations">
          {invitations.data?.invitations.map((i) => (
            <li key={i.id} className="flex flex-wrap items-center justify-between gap-2 rounded-xl border-2 border-rule bg-card px-4 py-3">
              <span>
                <span className="font-semibold">{i.email}</span>
                <span className="text-ink-soft"> · {roleLabel[i.role]} · invited by {i.invitedBy}</span>
              </span>
              <span className="tabular text-sm text-ink-soft">link valid until <LocalTime iso={new Date(i.expiresAt).toISOString()} /></span>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
