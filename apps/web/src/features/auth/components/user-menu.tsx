import { Link } from 'react-router-dom';
import { paths } from '../../../config/paths';
import { useMe } from '../api/get-me';
import { useSignOut } from '../api/sign-out';
import { ROLE_LABELS } from '../permissions';

/** The signed-in person's name and role, and sign-out. */
export function UserMenu() {
  const me = useMe();
  const signOut = useSignOut();
  if (me.isPending) return null;
  if (!me.data) {
    return (
      <Link
        to={paths.signIn.getHref()}
        className="rounded bg-white px-3 py-1 text-sm font-semibold text-tide-800 hover:bg-tide-50"
      >
        Sign in
      </Link>
    );
  }
  return (
    <div className="flex items-center gap-3" data-testid="user-menu">
      <div className="text-right leading-tight">
        <div className="text-sm font-semibold" data-testid="user-name">
          {me.data.displayName}
        </div>
        <div className="text-xs text-tide-100" data-testid="user-role">
          {ROLE_LABELS[me.data.role]}
        </div>
      </div>
      <button
        type="button"
        onClick={() => signOut.mutate()}
        disabled={signOut.isPending}
        className="rounded border border-tide-100 px-3 py-1 text-sm text-white hover:bg-tide-700 focus:outline-none focus-visible:ring-2 focus-visible:ring-white"
      >
        Sign out
      </button>
    </div>
  );
}
