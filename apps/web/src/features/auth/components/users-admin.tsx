import { roles, type Role } from '@ebbtide/contracts';
import { ApiError } from '../../../lib/api-client';
import { useChangeRole } from '../api/change-role';
import { useMe } from '../api/get-me';
import { useUsers } from '../api/get-users';
import { ROLE_LABELS } from '../permissions';

/** Admin: everyone who has signed in, and their role. A change applies on their next request. */
export function UsersAdmin() {
  const users = useUsers();
  const me = useMe();
  const change = useChangeRole();
  return (
    <section aria-labelledby="users-heading" className="max-w-3xl">
      <h1 id="users-heading" className="text-xl font-semibold">
        Users and roles
      </h1>
      <p className="mt-1 text-sm text-slate-600">
        People appear here after their first sign-in. A role set here takes effect on their next
        request and is no longer taken from the hospital sign-in.
      </p>
      {users.isPending && <p className="mt-4 text-slate-600">Loading users…</p>}
      {users.isError && (
        <p role="alert" className="mt-4 rounded border border-red-300 bg-red-50 p-3 text-red-800">
          {users.error.message}
        </p>
      )}
      {change.isError && (
        <p role="alert" className="mt-4 rounded border border-red-300 bg-red-50 p-3 text-red-800">
          {change.error instanceof ApiError
            ? change.error.body.message
            : 'The role was not changed'}
        </p>
      )}
      {users.data && (
        <table className="mt-4 w-full border-collapse text-sm">
          <thead>
            <tr className="border-b border-slate-300 text-left">
              <th className="py-2 pr-4 font-semibold">Name</th>
              <th className="py-2 pr-4 font-semibold">E-mail</th>
              <th className="py-2 pr-4 font-semibold">Role</th>
            </tr>
          </thead>
          <tbody>
            {users.data.map((u) => (
              <tr key={u.id} className="border-b border-slate-200">
                <td className="py-2 pr-4">{u.displayName}</td>
                <td className="py-2 pr-4 text-slate-600">{u.email ?? '—'}</td>
                <td className="py-2 pr-4">
                  <label className="sr-only" htmlFor={`role-${u.id}`}>
                    Role of {u.displayName}
                  </label>
                  <select
                    id={`role-${u.id}`}
                    value={u.role}
                    disabled={u.id === me.data?.id || change.isPending}
                    onChange={(e) => change.mutate({ userId: u.id, role: e.target.value as Role })}
                    className="rounded border border-slate-300 px-2 py-1"
                  >
                    {roles.map((r) => (
                      <option key={r} value={r}>
                        {ROLE_LABELS[r]}
                      </option>
                    ))}
                  </select>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
