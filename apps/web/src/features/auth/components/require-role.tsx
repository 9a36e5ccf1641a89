import type { ReactNode } from 'react';
import { Navigate, useLocation } from 'react-router-dom';
import type { Role } from '@ebbtide/contracts';
import { paths } from '../../../config/paths';
import { useMe } from '../api/get-me';
import { homeFor, ROLE_LABELS } from '../permissions';

/**
 * Route guard: a signed-out person goes to sign-in (and comes back here afterwards); a signed-in
 * person whose role may not open this screen sees a refusal, not the screen. The API refuses the
 * data too: this only keeps the screen away.
 */
export function RequireRole({
  allow,
  children,
}: {
  allow: readonly Role[] | 'signed-in';
  children: ReactNode;
}) {
  const me = useMe();
  const location = useLocation();
  if (me.isPending) {
    return <p className="text-slate-600">Checking your sign-in…</p>;
  }
  if (me.isError) {
    return (
      <p role="alert" className="rounded border border-red-300 bg-red-50 p-3 text-red-800">
        Could not check your sign-in: {me.error.message}
      </p>
    );
  }
  if (!me.data) {
    return (
      <Navigate
        to={paths.signIn.getHref(`${location.pathname}${location.search}${location.hash}`)}
        replace
      />
    );
  }
  if (allow !== 'signed-in' && !allow.includes(me.data.role)) {
    return <NotForYourRole roleLabel={ROLE_LABELS[me.data.role]} home={homeFor(me.data.role)} />;
  }
  return <>{children}</>;
}

function NotForYourRole({ roleLabel, home }: { roleLabel: string; home: string }) {
  return (
    <section aria-labelledby="refused-heading" data-testid="screen-refused">
      <h1 id="refused-heading" className="text-xl font-semibold">
        Not available to your role
      </h1>
      <p className="mt-2 max-w-prose text-slate-600">
        This screen is not open to a {roleLabel.toLowerCase()}. If you need it, ask the pharmacy
        system administrator.
      </p>
      <a href={home} className="mt-4 inline-block font-semibold text-tide-700 underline">
        Go to your start page
      </a>
    </section>
  );
}

/** The index route: each role's own start page (a trainee's is Teaching cases). */
export function HomeForRole({ clinical }: { clinical: ReactNode }) {
  const me = useMe();
  if (me.data && me.data.role !== 'pharmacist' && me.data.role !== 'reviewer') {
    return <Navigate to={homeFor(me.data.role)} replace />;
  }
  return <RequireRole allow={['pharmacist', 'reviewer']}>{clinical}</RequireRole>;
}
