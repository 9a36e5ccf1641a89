import { useState } from 'react';
import type { Dose, Level, LevelValidityResponse } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Empty, ErrorMessage } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { formatClinicalTime, formatNumber } from '../../../lib/clinical-format';
import { useDeleteLevel } from '../api/delete-level';
import { useLevelValidity } from '../api/get-level-validity';
import { LevelForm, SAMPLE_KINDS } from './level-form';

type Verdict = LevelValidityResponse['levels'][number];

const VERDICT = {
  'usable-bayesian': {
    label: 'Usable for the Bayesian fit',
    tone: 'border-tide-100 bg-tide-50 text-tide-900',
  },
  'usable-log-linear': {
    label: 'Usable for Bayesian and log-linear',
    tone: 'border-emerald-200 bg-emerald-50 text-emerald-900',
  },
  discard: { label: 'Not usable', tone: 'border-red-300 bg-red-50 text-red-800' },
} as const;

function VerdictCell({ verdict, pending }: { verdict: Verdict | undefined; pending: boolean }) {
  if (!verdict)
    return <span className="text-xs text-slate-500">{pending ? 'checking…' : 'no verdict'}</span>;
  const v = VERDICT[verdict.verdict];
  return (
    <div>
      <span className={`rounded border px-1.5 py-0.5 text-xs font-semibold ${v.tone}`}>
        {v.label}
      </span>
      {verdict.hoursAfterInfusionEnd !== null && (
        <span className="ml-1 text-xs text-slate-600">
          {formatNumber(verdict.hoursAfterInfusionEnd, 1)} h after infusion end
        </span>
      )}
      {verdict.reasons.length > 0 && (
        <ul className="mt-0.5 list-disc pl-4 text-xs text-slate-600">
          {verdict.reasons.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
      )}
    </div>
  );
}

export function LevelsTable({
  courseId,
  levels,
  doses,
  reference,
  isTeaching,
  canEdit,
  siFactor,
}: {
  courseId: string;
  levels: Level[];
  doses: Dose[];
  reference: string | null;
  isTeaching: boolean;
  canEdit: boolean;
  siFactor: number | null;
}) {
  const [editing, setEditing] = useState<string | null>(null);
  const remove = useDeleteLevel(courseId);
  const validity = useLevelValidity(courseId);
  const verdicts = new Map(validity.data?.levels.map((v) => [v.levelId, v]));
  return (
    <div className="flex flex-col gap-3">
      {canEdit && (
        <div className="border-b border-slate-100 pb-3">
          <LevelForm
            courseId={courseId}
            isTeaching={isTeaching}
            doses={doses}
            reference={reference}
            siFactor={siFactor}
          />
        </div>
      )}
      {remove.isError && <ErrorMessage error={remove.error} what="remove the level" />}
      {validity.isError && levels.length > 0 && (
        <ErrorMessage error={validity.error} what="check the levels" />
      )}
      {levels.length === 0 ? (
        <Empty>No levels recorded yet.</Empty>
      ) : (
        <table className="w-full text-left text-sm">
          <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
            <tr>
              <th scope="col">Collected</th>
              <th scope="col">Level</th>
              <th scope="col">Sample</th>
              <th scope="col">Verdict</th>
              {canEdit && (
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              )}
            </tr>
          </thead>
          <tbody className="[&_td]:py-1 [&_td]:pr-3 [&_td]:align-top">
            {levels.map((l) =>
              editing === l.id ? (
                <tr key={l.id}>
                  <td colSpan={5} className="bg-tide-50 p-2">
                    <LevelForm
                      courseId={courseId}
                      isTeaching={isTeaching}
                      doses={doses}
                      reference={reference}
                      siFactor={siFactor}
                      level={l}
                      onDone={() => setEditing(null)}
                    />
                  </td>
                </tr>
              ) : (
                <tr key={l.id} className="border-b border-slate-100">
                  <td className="whitespace-nowrap">
                    {formatClinicalTime({ at: l.collectedAt, hour: l.collectedHour })}
                  </td>
                  <td>
                    {l.echo}
                    {l.flags.length > 0 && (
                      <div className="text-xs text-orange-800">flagged: {l.flags.join(', ')}</div>
                    )}
                  </td>
                  <td>{SAMPLE_KINDS[l.sampleKind]}</td>
                  <td>
                    <VerdictCell verdict={verdicts.get(l.id)} pending={validity.isFetching} />
                  </td>
                  {canEdit && (
                    <td className="whitespace-nowrap">
                      <Button
                        variant="quiet"
                        aria-label={`Edit level ${l.echo}`}
                        onClick={() => setEditing(l.id)}
                      >
                        Edit
                      </Button>
                      <Button
                        variant="quiet"
                        aria-label={`Remove level ${l.echo}`}
                        onClick={() => {
                          if (window.confirm(`Remove the level ${l.echo}?`))
                            remove.mutate({ id: l.id, version: l.version });
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
      {validity.data && <Warnings warnings={validity.data.warnings} label="Level checks" />}
    </div>
  );
}
