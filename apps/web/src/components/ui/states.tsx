import type { ReactNode } from 'react';
import { ApiError } from '../../lib/api-client';

export function Loading({ what }: { what: string }) {
  return (
    <p role="status" className="py-2 text-sm text-slate-500">
      Loading {what}…
    </p>
  );
}

export function Empty({ children }: { children: ReactNode }) {
  return (
    <p className="rounded border border-dashed border-slate-300 px-3 py-3 text-sm text-slate-600">
      {children}
    </p>
  );
}

/** What went wrong, in the server's words when it gave them. */
export function ErrorMessage({ error, what }: { error: unknown; what?: string }) {
  const message =
    error instanceof ApiError
      ? `${error.body.message}${error.status === 404 ? '' : ` (${error.status})`}`
      : error instanceof Error
        ? error.message
        : String(error);
  return (
    <p
      role="alert"
      className="rounded border border-red-300 bg-red-50 px-3 py-2 text-sm text-red-800"
    >
      {what ? `Could not ${what}: ` : ''}
      {message}
    </p>
  );
}

/** Per-field server errors that have no field on this form. */
export function FormErrors({ messages }: { messages: string[] }) {
  if (messages.length === 0) return null;
  return (
    <ul
      role="alert"
      className="rounded border border-red-300 bg-red-50 px-3 py-2 text-sm text-red-800"
    >
      {messages.map((m) => (
        <li key={m}>{m}</li>
      ))}
    </ul>
  );
}
