/** The provider's own pages: sign-in, sign-out confirmation, signed out. Tailwind classes. */

export const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function layout(title: string, body: string): string {
  return `<!doctype html>
<html lang="en-GB">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="icon" href="data:,">
<link rel="stylesheet" href="/assets/styles.css">
<title>${esc(title)} · Kestrel Bay sign-in</title>
</head>
<body class="min-h-screen bg-slate-50 font-sans text-slate-900">
<div class="bg-tide-800 px-4 py-3 text-white">
  <span class="text-lg font-bold tracking-tight">Kestrel Bay Regional Hospital</span>
  <span class="ml-2 text-sm text-tide-100">Staff sign-in · development stand-in</span>
</div>
<main class="mx-auto mt-12 max-w-md px-4">
  <div class="rounded-lg border border-slate-200 bg-white p-6 shadow-sm">
${body}
  </div>
  <p class="mt-4 text-center text-xs text-slate-500">Local identity provider for development and tests. Demo accounts only; never used in production.</p>
</main>
</body>
</html>`;
}

export function loginPage(opts: {
  action: string;
  clientName: string;
  login?: string;
  error?: string;
}): string {
  const error = opts.error
    ? `<p role="alert" class="mb-4 rounded border border-red-300 bg-red-50 p-3 text-sm text-red-800">${esc(opts.error)}</p>`
    : '';
  return layout(
    'Sign in',
    `<h1 class="text-xl font-semibold text-tide-900">Sign in</h1>
    <p class="mt-1 text-sm text-slate-600">to continue to ${esc(opts.clientName)}</p>
    <form method="post" action="${esc(opts.action)}" class="mt-6 space-y-4" autocomplete="on">
      ${error}
      <div>
        <label for="login" class="block text-sm font-semibold text-slate-700">User name or e-mail</label>
        <input id="login" name="login" type="text" required autofocus autocomplete="username" value="${esc(opts.login ?? '')}"
          class="mt-1 block w-full rounded border border-slate-300 px-3 py-2 focus:border-tide-600 focus:outline-none focus:ring-2 focus:ring-tide-100">
      </div>
      <div>
        <label for="password" class="block text-sm font-semibold text-slate-700">Password</label>
        <input id="password" name="password" type="password" required autocomplete="current-password"
          class="mt-1 block w-full rounded border border-slate-300 px-3 py-2 focus:border-tide-600 focus:outline-none focus:ring-2 focus:ring-tide-100">
      </div>
      <button type="submit" class="w-full rounded bg-tide-700 px-4 py-2 font-semibold text-white hover:bg-tide-800 focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600 focus-visible:ring-offset-2">Sign in</button>
    </form>`,
  );
}

export function logoutPage(form: string, host: string): string {
  return layout(
    'Sign out',
    `<h1 class="text-xl font-semibold text-tide-900">Sign out of the hospital sign-in too?</h1>
    <p class="mt-2 text-sm text-slate-600">You have left Ebbtide. Signing out here as well means the next person at this computer must enter a password (${esc(host)}).</p>
    ${form}
    <div class="mt-6 flex gap-3">
      <button autofocus type="submit" form="op.logoutForm" value="yes" name="logout" class="flex-1 rounded bg-tide-700 px-4 py-2 font-semibold text-white hover:bg-tide-800">Sign out</button>
      <button type="submit" form="op.logoutForm" class="flex-1 rounded border border-slate-300 px-4 py-2 font-semibold text-slate-700 hover:bg-slate-50">Stay signed in here</button>
    </div>`,
  );
}

export function signedOutPage(): string {
  return layout(
    'Signed out',
    `<h1 class="text-xl font-semibold text-tide-900">You are signed out</h1>
    <p class="mt-2 text-sm text-slate-600">You can close this window.</p>`,
  );
}

export function errorPage(message: string): string {
  return layout(
    'Sign-in problem',
    `<h1 class="text-xl font-semibold text-tide-900">Sign-in problem</h1>
    <p class="mt-2 text-sm text-slate-700">${esc(message)}</p>`,
  );
}
