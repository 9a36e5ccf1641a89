import { useState } from 'react';
import type { AuditEvent } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { ApiError } from '../../../lib/api-client';
import { useAudit, type AuditFilters } from '../api/get-audit';

/** Top-level keys whose values differ between before and after. */
function diff(
  before: unknown,
  after: unknown,
): Array<{ key: string; before: string; after: string }> {
  const obj = (x: unknown) => (x && typeof x === 'object' ? (x as Record<string, unknown>) : {});
  const b = obj(before);
  const a = obj(after);
  const show = (x: unknown) => (x === undefined ? '—' : JSON.stringify(x).slice(0, 300));
  return [...new Set([...Object.keys(b), ...Object.keys(a)])]
    .filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k]))
    .map((k) => ({ key: k, before: show(b[k]), after: show(a[k]) }));
}

function Row({ e }: { e: AuditEvent }) {
  const [open, setOpen] = useState(false);
  const changes = diff(e.before, e.after);
  return (
    <>
      <tr className="border-t border-slate-100 align-top" data-testid="audit-row">
        <td className="whitespace-nowrap">{new Date(e.occurredAt).toLocaleString('en-GB')}</td>
        <td>{e.actorName ?? e.actorSubject ?? 'system'}</td>
        <td className="font-mono">{e.action}</td>
        <td className="font-mono text-xs">
          {e.entityType ?? ''} {e.entityId?.slice(0, 8) ?? ''}
        </td>
        <td>
          {changes.length > 0 && (
            <Button variant="quiet" onClick={() => setOpen(!open)}>
              {open ? 'Hide' : `${changes.length} change(s)`}
            </Button>
          )}
        </td>
      </tr>
      {open && (
        <tr>
          <td colSpan={5}>
            <table className="mb-2 w-full text-xs" aria-label="Before and after">
              <thead>
                <tr className="text-slate-500">
                  <th className="text-left">Field</th>
                  <th className="text-left">Before</th>
                  <th className="text-left">After</th>
                </tr>
              </thead>
              <tbody>
                {changes.map((c) => (
                  <tr key={c.key} className="align-top">
                    <td className="pr-2 font-mono">{c.key}</td>
                    <td className="break-all pr-2 text-red-800">{c.before}</td>
                    <td className="break-all text-emerald-800">{c.after}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </td>
        </tr>
      )}
    </>
  );
}

const FIELDS: Array<{ key: keyof AuditFilters; label: string; placeholder: string }> = [
  { key: 'patientId', label: 'Patient id', placeholder: 'uuid' },
  { key: 'courseId', label: 'Course id', placeholder: 'uuid' },
  { key: 'userId', label: 'User id', placeholder: 'uuid' },
  { key: 'action', label: 'Action', placeholder: 'plan. or plan.countersign' },
  { key: 'from', label: 'From', placeholder: '2026-12-01T00:00:00Z' },
  { key: 'to', label: 'To', placeholder: '2026-12-02T00:00:00Z' },
];

/** The append-only audit trail (admins): who, what, when, before and after. */
export function AuditScreen() {
  const [draft, setDraft] = useState<AuditFilters>({});
  const [filters, setFilters] = useState<AuditFilters>({});
  const audit = useAudit(filters);
  const errors = audit.error instanceof ApiError ? audit.error.body.fieldErrors : undefined;
  return (
    <div className="space-y-4">
      <h1 className="text-xl font-semibold text-tide-900">Audit trail</h1>
      <Panel title="Filter">
        <form
          className="grid gap-2 text-sm sm:grid-cols-3"
          onSubmit={(e) => {
            e.preventDefault();
            setFilters({ ...draft, page: 1 });
          }}
        >
          {FIELDS.map((f) => (
            <label key={f.key} className="flex flex-col">
              {f.label}
              <input
                value={(draft[f.key] as string | undefined) ?? ''}
                placeholder={f.placeholder}
                onChange={(e) => setDraft({ ...draft, [f.key]: e.target.value || undefined })}
                className="rounded border p-1"
                aria-invalid={errors?.[f.key] ? true : undefined}
              />
              {errors?.[f.key] && <span className="text-red-800">{errors[f.key]![0]}</span>}
            </label>
          ))}
          <div>
            <Button type="submit">Apply</Button>
          </div>
        </form>
      </Panel>
      <Panel title={`Events${audit.data ? ` (${audit.data.total})` : ''}`}>
        {audit.isLoading && <Loading what="the audit trail" />}
        {audit.error && !errors ? <ErrorMessage error={audit.error} /> : null}
        {audit.data && audit.data.items.length === 0 && <Empty>No event matches.</Empty>}
        {audit.data && audit.data.items.length > 0 && (
          <table className="w-full text-left text-sm">
            <thead>
              <tr className="text-xs text-slate-500">
                <th>When</th>
                <th>Who</th>
                <th>What</th>
                <th>Record</th>
                <th>Before / after</th>
              </tr>
            </thead>
            <tbody>
              {audit.data.items.map((e) => (
                <Row key={e.id} e={e} />
              ))}
            </tbody>
          </table>
        )}
        {audit.data && audit.data.total > audit.data.page * audit.data.pageSize && (
          <Button
            variant="secondary"
            onClick={() => setFilters({ ...filters, page: (filters.page ?? 1) + 1 })}
          >
            Older events
          </Button>
        )}
      </Panel>
    </div>
  );
}
