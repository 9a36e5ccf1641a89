import { useId, type ReactNode } from 'react';

/**
 * A labelled form control with its hint and error. The control is rendered by `children`,
 * which receives the ids to wire (`id`, `aria-describedby`, `aria-invalid`).
 */
export function Field({
  label,
  hint,
  error,
  children,
  className = '',
}: {
  label: string;
  hint?: ReactNode;
  error?: string | undefined;
  className?: string;
  children: (a11y: {
    id: string;
    'aria-describedby': string | undefined;
    'aria-invalid': boolean;
  }) => ReactNode;
}) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(' ');
  return (
    <div className={`flex flex-col gap-0.5 ${className}`}>
      <label htmlFor={id} className="text-xs font-semibold text-slate-700">
        {label}
      </label>
      {children({ id, 'aria-describedby': describedBy || undefined, 'aria-invalid': !!error })}
      {hint && (
        <span id={hintId} className="text-xs text-slate-500">
          {hint}
        </span>
      )}
      {error && (
        <span id={errorId} role="alert" className="text-xs font-medium text-red-700">
          {error}
        </span>
      )}
    </div>
  );
}

export const inputClass =
  'rounded border border-slate-300 bg-white px-2 py-1 text-sm text-slate-900 focus:border-tide-600 focus:outline-none focus:ring-1 focus:ring-tide-600 aria-[invalid=true]:border-red-500';
