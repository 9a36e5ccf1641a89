import type { ReactNode } from 'react';

/** A native disclosure: keyboard reachable, screen-reader friendly. */
export function Disclosure({ summary, children }: { summary: string; children: ReactNode }) {
  return (
    <details className="mt-1 text-xs text-slate-600">
      <summary className="cursor-pointer text-tide-700 focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600">
        {summary}
      </summary>
      <div className="mt-1 rounded bg-slate-50 p-2">{children}</div>
    </details>
  );
}
