import { useState } from 'react';
import type { PtaResult } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { ApiError } from '../../../lib/api-client';
import { formatNumber } from '../../../lib/clinical-format';
import { useJob } from '../api/get-job';
import { useStartPta } from '../api/start-pta';
import type { RegimenRoute } from '../utils/route';

/** Probability of target attainment for one candidate: a server job, polled with its progress. */
export function PtaCell({
  courseId,
  regimen,
  parameters,
}: {
  courseId: string;
  regimen: {
    doseMg: number;
    intervalH: number;
    infusionH: number;
    loadingDoseMg: number | null;
    route: RegimenRoute;
  };
  parameters: 'map' | 'population';
}) {
  const start = useStartPta(courseId);
  const [jobId, setJobId] = useState<string | null>(null);
  const job = useJob(jobId);
  if (start.isError) {
    const missing = start.error instanceof ApiError && start.error.status === 404;
    return (
      <span className="text-xs text-slate-500">
        {missing ? 'not available' : start.error.message}
      </span>
    );
  }
  if (!jobId)
    return (
      <Button
        variant="quiet"
        disabled={start.isPending}
        onClick={async () => {
          const accepted = await start
            .mutateAsync({
              parameters,
              regimen: {
                doseMg: regimen.doseMg,
                intervalH: regimen.intervalH,
                infusionH: regimen.infusionH,
                route: regimen.route,
                count: 6,
                loadingDoseMg: regimen.loadingDoseMg,
              },
            })
            .catch(() => null);
          if (accepted) setJobId(accepted.jobId);
        }}
      >
        Estimate
      </Button>
    );
  if (job.isError) return <span className="text-xs text-red-700">{job.error.message}</span>;
  const j = job.data;
  if (!j || j.state === 'queued' || j.state === 'running')
    return (
      <span className="flex items-center gap-1 text-xs text-slate-600">
        <progress max={1} value={j?.progress ?? 0} aria-label="PTA progress" className="h-2 w-16" />
        {formatNumber((j?.progress ?? 0) * 100, 0)}%
      </span>
    );
  if (j.state !== 'completed')
    return <span className="text-xs text-red-700">{j.error ?? j.state}</span>;
  const r = j.result as PtaResult;
  return (
    <span className="font-semibold" title={`${r.samples} simulated patients`}>
      {formatNumber(r.probability * 100, 0)}%
    </span>
  );
}
