import { ApiError } from '../../../lib/api-client';
import { useHealth } from '../api/get-health';

/** A compact indicator of API and database health for the shell's header. */
export function HealthBadge() {
  const health = useHealth();
  let tone = 'bg-slate-100 text-slate-700 ring-slate-300';
  let label = 'Checking database…';
  if (health.isError) {
    const degraded = health.error instanceof ApiError && health.error.status === 503;
    tone = 'bg-red-50 text-red-800 ring-red-300';
    label = degraded ? 'Database unreachable' : 'API unreachable';
  } else if (health.data) {
    tone = 'bg-emerald-50 text-emerald-800 ring-emerald-300';
    label = 'Database connected';
  }
  return (
    <span
      role="status"
      aria-live="polite"
      data-testid="health-status"
      className={`inline-flex items-center gap-1.5 rounded-full px-2.5 py-0.5 text-xs font-semibold ring-1 ${tone}`}
    >
      <span aria-hidden className="h-1.5 w-1.5 rounded-full bg-current" />
      {label}
    </span>
  );
}
