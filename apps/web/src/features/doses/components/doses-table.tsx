import { useState } from 'react';
import type { Dose } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Empty, ErrorMessage } from '../../../components/ui/states';
import { echoHours, formatClinicalTime } from '../../../lib/clinical-format';
import { useDeleteDose } from '../api/delete-dose';
import { DoseForm } from './dose-form';

const ROUTES = { 'iv-infusion': 'IV infusion', 'iv-bolus': 'IV bolus', oral: 'oral', im: 'IM' };

export function DosesTable({
  courseId,
  doses,
  isTeaching,
  canEdit,
  plausible,
}: {
  courseId: string;
  doses: Dose[];
  isTeaching: boolean;
  canEdit: boolean;
  plausible: { min: number; max: number } | null;
}) {
  const [editing, setEditing] = useState<string | null>(null);
  const remove = useDeleteDose(courseId);
  return (
    <div className="flex flex-col gap-3">
      {canEdit && (
        <div className="border-b border-slate-100 pb-3">
          <DoseForm courseId={courseId} isTeaching={isTeaching} plausible={plausible} />
        </div>
      )}
      {remove.isError && <ErrorMessage error={remove.error} what="remove the dose" />}
      {doses.length === 0 ? (
        <Empty>No doses recorded yet.</Empty>
      ) : (
        <table className="w-full text-left text-sm">
          <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
            <tr>
              <th scope="col">Started</th>
              <th scope="col">Dose</th>
              <th scope="col">Route</th>
              <th scope="col">Duration</th>
              <th scope="col">Given</th>
              <th scope="col">Source</th>
              {canEdit && (
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              )}
            </tr>
          </thead>
          <tbody className="[&_td]:py-1 [&_td]:pr-3">
            {doses.map((d) =>
              editing === d.id ? (
                <tr key={d.id}>
                  <td colSpan={7} className="bg-tide-50 p-2">
                    <DoseForm
                      courseId={courseId}
                      isTeaching={isTeaching}
                      plausible={plausible}
                      dose={d}
                      onDone={() => setEditing(null)}
                    />
                  </td>
                </tr>
              ) : (
                <tr
                  key={d.id}
                  className={`border-b border-slate-100 ${d.administrationStatus === 'missed' ? 'text-slate-400 line-through' : ''}`}
                >
                  <td className="whitespace-nowrap">
                    {formatClinicalTime({ at: d.startAt, hour: d.startHour })}
                  </td>
                  <td>{d.echo}</td>
                  <td>{ROUTES[d.route]}</td>
                  <td>{d.durationH ? echoHours(d.durationH) : '—'}</td>
                  <td>{d.administrationStatus}</td>
                  <td className="text-xs text-slate-500">{d.source}</td>
                  {canEdit && (
                    <td className="whitespace-nowrap">
                      <Button
                        variant="quiet"
                        aria-label={`Edit dose ${d.echo}`}
                        onClick={() => setEditing(d.id)}
                      >
                        Edit
                      </Button>
                      <Button
                        variant="quiet"
                        aria-label={`Remove dose ${d.echo}`}
                        onClick={() => {
                          if (window.confirm(`Remove the dose ${d.echo}?`))
                            remove.mutate({ id: d.id, version: d.version });
                        }}
                      >
                        Remove
                      </Button>
                    </td>
                  )}
                </tr>
              ),
            )}
          </tbody>
        </table>
      )}
    </div>
  );
}
