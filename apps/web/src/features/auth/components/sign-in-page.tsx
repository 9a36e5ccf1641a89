import { Navigate, useSearchParams } from 'react-router-dom';
import { paths } from '../../../config/paths';
import { useMe } from '../api/get-me';
import { homeFor } from '../permissions';

const MESSAGES: Record<string, string> = {
  'sign-in-failed': 'Sign-in did not complete. Please try again.',
  'sign-in-expired': 'The sign-in took too long or was started elsewhere. Please try again.',
};

/** Only paths on this site may be returned to. */
const safeReturnTo = (value: string | null) =>
  value && value.startsWith('/') && !value.startsWith('//') ? value : null;

/** The sign-in entry: one button that goes to the hospital's sign-in (through the API). */
export function SignInPage() {
  const [params] = useSearchParams();
  const me = useMe();
  const returnTo = safeReturnTo(params.get('returnTo'));
  const error = params.get('error');
  if (me.data) return <Navigate to={returnTo ?? homeFor(me.data.role)} replace />;
  return (
    <section aria-labelledby="sign-in-heading" className="mx-auto mt-8 max-w-md">
      <div className="rounded-lg border border-slate-200 bg-white p-6 shadow-sm">
        <h1 id="sign-in-heading" className="text-xl font-semibold text-tide-900">
          Sign in to Ebbtide
        </h1>
        <p className="mt-2 text-sm text-slate-600">
          Use your Kestrel Bay staff account. You will come back to{' '}
          {returnTo && returnTo !== '/' ? 'the page you asked for' : 'your start page'}.
        </p>
        {error && (
          <p
            role="alert"
            className="mt-4 rounded border border-red-300 bg-red-50 p-3 text-sm text-red-800"
          >
            {MESSAGES[error] ?? 'Sign-in did not complete. Please try again.'}
          </p>
        )}
        <a
          href={paths.authLogin.getHref(returnTo ?? '/')}
          className="mt-6 block rounded bg-tide-700 px-4 py-2 text-center font-semibold text-white hover:bg-tide-800 focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600 focus-visible:ring-offset-2"
        >
          Continue to hospital sign-in
        </a>
      </div>
    </section>
  );
}

export function SignedOutPage() {
  return (
    <section aria-labelledby="signed-out-heading" className="mx-auto mt-8 max-w-md">
      <div className="rounded-lg border border-slate-200 bg-white p-6 shadow-sm">
        <h1 id="signed-out-heading" className="text-xl font-semibold text-tide-900">
          You are signed out
        </h1>
        <p className="mt-2 text-sm text-slate-600">Your Ebbtide session has ended.</p>
        <a
          href={paths.signIn.getHref()}
          className="mt-4 inline-block font-semibold text-tide-700 underline"
        >
          Sign in again
        </a>
      </div>
    </section>
  );
}
