import { useId, type ReactNode } from 'react';
import { ErrorBoundary } from './error-boundary';

/** A titled block of a screen with its own error boundary. */
export function Panel({
  title,
  actions,
  children,
  className = '',
}: {
  title: string;
  actions?: ReactNode;
  children: ReactNode;
  className?: string;
}) {
  const id = useId();
  return (
    <section
      aria-labelledby={id}
      className={`rounded-md border border-slate-200 bg-white shadow-sm ${className}`}
    >
      <header className="flex flex-wrap items-center justify-between gap-2 border-b border-slate-100 px-3 py-2">
        <h2 id={id} className="text-sm font-semibold tracking-wide text-tide-900">
          {title}
        </h2>
        {actions && <div className="flex flex-wrap items-center gap-2">{actions}</div>}
      </header>
      <div className="p-3">
        <ErrorBoundary name={title}>{children}</ErrorBoundary>
      </div>
    </section>
  );
}
