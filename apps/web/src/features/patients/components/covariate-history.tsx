import { Button } from '../../../components/ui/button';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { formatClinicalTime } from '../../../lib/clinical-format';
import { useDeleteCovariate } from '../api/delete-covariate';
import { useCovariates } from '../api/get-covariates';
import { KIND_LABELS } from './covariate-form';

export function CovariateHistory({ patientId, canEdit }: { patientId: string; canEdit: boolean }) {
  const covariates = useCovariates(patientId);
  const remove = useDeleteCovariate(patientId);
  if (covariates.isPending) return <Loading what="covariates" />;
  if (covariates.isError) return <ErrorMessage error={covariates.error} what="load covariates" />;
  if (covariates.data.items.length === 0) return <Empty>No covariates recorded yet.</Empty>;
  return (
    <>
      {remove.isError && <ErrorMessage error={remove.error} what="remove the covariate" />}
      <table className="w-full text-left text-sm">
        <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
          <tr>
            <th scope="col">When</th>
            <th scope="col">Covariate</th>
            <th scope="col">Value</th>
            <th scope="col">Detail</th>
            <th scope="col">Entered by</th>
            {canEdit && (
              <th scope="col">
                <span className="sr-only">Actions</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody className="[&_td]:py-1 [&_td]:pr-3">
          {covariates.data.items.map((c) => (
            <tr key={c.id} className="border-b border-slate-100">
              <td className="whitespace-nowrap">
                {formatClinicalTime({ at: c.observedAt, hour: c.observedHour })}
              </td>
              <td>{KIND_LABELS[c.kind]}</td>
              <td>{c.kind === 'dialysis' ? (c.dialysisStatus ?? '—') : c.echo}</td>
              <td className="text-xs text-slate-600">
                {[c.weightSource, c.note].filter(Boolean).join(' · ') || '—'}
              </td>
              <td className="text-xs text-slate-500">{c.source}</td>
              {canEdit && (
                <td>
                  <Button
                    variant="quiet"
                    aria-label={`Remove ${KIND_LABELS[c.kind]} ${c.echo}`}
                    onClick={() => {
                      if (window.confirm(`Remove ${KIND_LABELS[c.kind]} ${c.echo}?`))
                        remove.mutate({ id: c.id, version: c.version });
                    }}
                  >
                    Remove
                  </Button>
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </>
  );
}
