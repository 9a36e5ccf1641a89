import { format } from 'date-fns';
import { useHealth } from '../api/get-health';

export function StatusPage() {
  const health = useHealth();
  return (
    <section aria-labelledby="status-heading" className="max-w-xl">
      <h1 id="status-heading" className="text-xl font-semibold">
        System status
      </h1>
      {health.isPending && <p className="mt-4 text-slate-600">Asking the server…</p>}
      {health.isError && (
        <p className="mt-4 rounded border border-red-300 bg-red-50 p-3 text-red-800">
          The server did not answer: {health.error.message}
        </p>
      )}
      {health.data && (
        <dl className="mt-4 grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          <dt className="font-semibold">API version</dt>
          <dd>{health.data.version}</dd>
          <dt className="font-semibold">Database</dt>
          <dd>{health.data.database.reachable ? 'reachable' : 'not reachable'}</dd>
          <dt className="font-semibold">Checked at</dt>
          <dd>{format(new Date(health.data.time), 'PPpp')}</dd>
        </dl>
      )}
    </section>
  );
}
