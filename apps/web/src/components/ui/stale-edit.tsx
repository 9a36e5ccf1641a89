import type { StaleEditBody } from '../../lib/api-client';
import { Button } from './button';

const hidden = new Set(['id', 'courseId', 'patientId', 'createdAt', 'updatedAt', 'source']);

function show(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (Array.isArray(v)) return v.join(', ') || '—';
  return String(v);
}

/**
 * A stale edit (409): someone saved this row since it was read. Both versions side by side;
 * the user's version is kept in the form until they choose.
 */
export function StaleEdit({
  body,
  onReload,
  onDismiss,
}: {
  body: StaleEditBody;
  onReload: () => void;
  onDismiss: () => void;
}) {
  const keys = Array.from(
    new Set([...Object.keys(body.yours), ...Object.keys(body.current)]),
  ).filter((k) => !hidden.has(k));
  return (
    <div role="alert" className="rounded border border-amber-400 bg-amber-50 p-3 text-sm">
      <p className="font-semibold text-amber-900">
        This row changed while you were editing (you read version {body.yourVersion}, it is now
        version {body.currentVersion}). Nothing was overwritten.
      </p>
      <table className="mt-2 w-full text-left text-xs">
        <thead>
          <tr>
            <th className="pr-3">Field</th>
            <th className="pr-3">Your edit</th>
            <th>Saved now</th>
          </tr>
        </thead>
        <tbody>
          {keys.map((k) => {
            const differs = show(body.yours[k]) !== show(body.current[k]);
            return (
              <tr key={k} className={differs ? 'font-semibold' : 'text-slate-600'}>
                <td className="pr-3">{k}</td>
                <td className="pr-3">{k in body.yours ? show(body.yours[k]) : '(unchanged)'}</td>
                <td>{show(body.current[k])}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <div className="mt-2 flex gap-2">
        <Button variant="secondary" onClick={onReload}>
          Load the saved version
        </Button>
        <Button variant="quiet" onClick={onDismiss}>
          Keep editing mine
        </Button>
      </div>
    </div>
  );
}
